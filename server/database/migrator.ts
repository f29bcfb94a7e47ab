import type { Sequelize } from 'sequelize'
import { Umzug, SequelizeStorage } from 'umzug'
import type { MigrationFn as UmzugMigrationFn } from 'umzug'
import { migrations } from './migrations'

export type MigrationFn = UmzugMigrationFn<Sequelize>

/** Umzug over the explicit migration list, recording what ran in the `schema_migrations` table. */
export function createMigrator(sequelize: Sequelize) {
  return new Umzug({
    // Each migration is one multi-statement query, which PostgreSQL runs as one implicit transaction.
    migrations,
    context: sequelize,
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: undefined,
  })
}

/** Applies every pending migration; returns the names applied. */
export async function migrateUp(sequelize: Sequelize): Promise<string[]> {
  const applied = await createMigrator(sequelize).up()
  return applied.map(m => m.name)
}
