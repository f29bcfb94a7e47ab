import type { MigrationFn } from '../migrator'

/**
 * The sign-in, sign-up, reset-request and e-mail counts (server/utils/rate-limit.ts), shared by
 * every app server and kept across restarts. The columns are exactly those rate-limiter-flexible's
 * PostgreSQL store reads and writes (key, points, expire in epoch milliseconds); the app passes
 * `tableCreated: true`, so it never creates the table itself. The index serves the store's sweep
 * of expired rows.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE TABLE rate_limits (
      key varchar(255) PRIMARY KEY,
      points integer NOT NULL DEFAULT 0,
      expire bigint
    );
    CREATE INDEX rate_limits_expire_idx ON rate_limits (expire);
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query('DROP TABLE IF EXISTS rate_limits')
}
