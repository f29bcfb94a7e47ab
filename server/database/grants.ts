import { QueryTypes, type Sequelize } from 'sequelize'

/** Tables the application may read and append to, never change or empty (their triggers refuse it too). */
export const APPEND_ONLY_TABLES = ['audit_events', 'proof_tests', 'vessel_events', 'fills', 'tier_signoffs']
/** Tables the application may not touch at all: the migrations' own bookkeeping. */
export const MIGRATOR_ONLY_TABLES = ['schema_migrations']

/**
 * Gives the application role `role` what it needs on every table in the public schema — those of
 * later migrations included, because it runs after every migration run and names no table but the
 * exceptions: SELECT, INSERT, UPDATE and DELETE on tables, USAGE and SELECT on sequences; only SELECT
 * and INSERT on the append-only tables; nothing on the migrations' bookkeeping. Run as the owner role,
 * in one transaction, so a connection of the application never sees a half-granted schema. The role
 * owns nothing, so it can neither alter a table nor drop or disable a trigger.
 */
export async function grantAppRole(sequelize: Sequelize, role: string): Promise<void> {
  const who = sequelize.getQueryInterface().quoteIdentifier(role)
  const present = await sequelize.query<{ name: string }>(
    `SELECT tablename AS name FROM pg_tables WHERE schemaname = 'public' AND tablename IN (:names)`,
    { replacements: { names: [...APPEND_ONLY_TABLES, ...MIGRATOR_ONLY_TABLES] }, type: QueryTypes.SELECT })
  const has = (name: string) => present.some(t => t.name === name)
  const statements = [
    `REVOKE ALL ON ALL TABLES IN SCHEMA public FROM ${who}`,
    `REVOKE ALL ON ALL SEQUENCES IN SCHEMA public FROM ${who}`,
    `GRANT SELECT, INSERT, UPDATE, DELETE ON ALL TABLES IN SCHEMA public TO ${who}`,
    `GRANT USAGE, SELECT ON ALL SEQUENCES IN SCHEMA public TO ${who}`,
    ...APPEND_ONLY_TABLES.filter(has).map(t => `REVOKE UPDATE, DELETE ON ${t} FROM ${who}`),
    ...MIGRATOR_ONLY_TABLES.filter(has).map(t => `REVOKE ALL ON ${t} FROM ${who}`),
  ]
  await sequelize.transaction(async (transaction) => {
    for (const statement of statements) await sequelize.query(statement, { transaction })
  })
}
