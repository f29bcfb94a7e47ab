import type { MigrationFn } from '../migrator'

/**
 * The account's session version: a password reset raises it, and `requireMember` refuses a session
 * cookie sealed at a lower version, so every session begun before the reset ends with it.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query('ALTER TABLE users ADD COLUMN session_version integer NOT NULL DEFAULT 0')
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query('ALTER TABLE users DROP COLUMN IF EXISTS session_version')
}
