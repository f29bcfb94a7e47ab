import type { MigrationFn } from '../migrator'

/**
 * Per-notice claims: each run that takes a notice writes a fresh `claim_id` and settles the row only
 * `WHERE claim_id` is its own, so a run whose lease ran out can never settle another run's claim.
 * `deferrals` counts the times the mail server could not be reached (a backoff, not an attempt).
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`ALTER TABLE notices
    ADD COLUMN claim_id uuid,
    ADD COLUMN deferrals integer NOT NULL DEFAULT 0 CHECK (deferrals >= 0)`)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query('ALTER TABLE notices DROP COLUMN IF EXISTS claim_id, DROP COLUMN IF EXISTS deferrals')
}
