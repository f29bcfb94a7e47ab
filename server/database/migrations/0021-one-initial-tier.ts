import type { MigrationFn } from '../migrator'

/**
 * At most one initial T4 per club (`npm run tier:initial`): the command refuses once any T4 sign-off
 * exists, and this index makes two runs at the same moment unable to both succeed.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`CREATE UNIQUE INDEX tier_signoffs_one_initial ON tier_signoffs (club_id) WHERE kind = 'initial'`)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query('DROP INDEX IF EXISTS tier_signoffs_one_initial')
}
