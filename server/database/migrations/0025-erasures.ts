import { QueryTypes, type Sequelize } from 'sequelize'
import type { MigrationFn } from '../migrator'

// Keys that held a person's values in audit rows written before the trail named people by id only
// (migration 0010): sign-up (e-mail, name, guardian's e-mail), guardian consent requests, contact edits, renames.
const PERSONAL_KEYS = ['name', 'email', 'phone', 'birthDate', 'guardianName', 'guardianEmail', 'emergencyContactName', 'emergencyContactPhone', 'typedName']
// The guardian-consent reason of those days named the guardian and their e-mail in brackets.
const OLD_CONSENT_REASON = 'Consent confirmed by the guardian (%'
const CONSENT_REASON = 'Consent confirmed by the guardian from the e-mailed link'

/**
 * Removes, once, the names and e-mails that audit rows written before migration 0010 hold: the actor's
 * copied name on rows that have the actor's id, the personal keys of `before`/`after` on rows about a
 * member or an account (their names are kept in `after.changed`, as today's rows do), and the old
 * guardian-consent reason. Then validates the check that keeps names out of rows with an actor id.
 * The trail refuses UPDATE, so its guard is lifted for these statements only (run as the owner role).
 * Audited: one `audit.personal_data_scrubbed` event per club whose rows changed, with their count.
 * Returns the number of rows changed.
 */
export async function scrubLegacyAuditRows(sequelize: Sequelize): Promise<number> {
  return sequelize.transaction(async (transaction) => {
    await sequelize.query('ALTER TABLE audit_events DISABLE TRIGGER audit_events_no_update_delete', { transaction })
    const changed = await sequelize.query<{ club_id: string }>(`
      WITH scrubbed AS (
        UPDATE audit_events a SET
          actor_name = CASE WHEN a.actor_membership_id IS NOT NULL THEN NULL ELSE a.actor_name END,
          before = CASE WHEN jsonb_exists_any(a.before, ARRAY[:keys]::text[]) THEN a.before - ARRAY[:keys]::text[] ELSE a.before END,
          after = CASE WHEN jsonb_exists_any(a.after, ARRAY[:keys]::text[])
            THEN (a.after - ARRAY[:keys]::text[]) || jsonb_build_object('changed', coalesce(a.after->'changed', '[]'::jsonb)
              || (SELECT coalesce(jsonb_agg(k), '[]'::jsonb) FROM jsonb_object_keys(a.after) k WHERE k = ANY(ARRAY[:keys]::text[])))
            ELSE a.after END,
          reason = CASE WHEN a.reason LIKE :oldReason THEN :newReason ELSE a.reason END
        WHERE (a.actor_membership_id IS NOT NULL AND a.actor_name IS NOT NULL)
           OR a.reason LIKE :oldReason
           OR (a.subject_type IN ('membership', 'user') AND (jsonb_exists_any(a.before, ARRAY[:keys]::text[]) OR jsonb_exists_any(a.after, ARRAY[:keys]::text[])))
        RETURNING a.club_id)
      SELECT club_id FROM scrubbed`,
    { replacements: { keys: PERSONAL_KEYS, oldReason: OLD_CONSENT_REASON, newReason: CONSENT_REASON }, type: QueryTypes.SELECT, transaction })
    await sequelize.query('ALTER TABLE audit_events ENABLE TRIGGER audit_events_no_update_delete', { transaction })
    const perClub = new Map<string, number>()
    for (const r of changed) perClub.set(r.club_id, (perClub.get(r.club_id) ?? 0) + 1)
    for (const [clubId, rows] of perClub) {
      await sequelize.query(`INSERT INTO audit_events (club_id, actor_membership_id, actor_name, action, subject_type, subject_id, after, reason)
        VALUES (:clubId, NULL, 'System', 'audit.personal_data_scrubbed', 'club', :clubId, :after, :reason)`, {
        replacements: { clubId, after: JSON.stringify({ rows }), reason: 'Names and e-mails removed once from audit events written before the trail named people by id only (migration 0025)' },
        transaction,
      })
    }
    return changed.length
  })
}

/**
 * Erasure on request (decision 0046). `erasures` lists every erased membership (ids only, never a
 * name): a restore re-applies it (server/database/erasures.ts `reapplyErasures`), so a backup cannot
 * bring an erased person back. No foreign keys: the list outlives and precedes the rows it names when
 * carried from one database to another. Then the one-time scrub of the old audit rows.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE TABLE erasures (
      membership_id uuid PRIMARY KEY,
      user_id uuid NOT NULL,
      club_id uuid NOT NULL,
      erased_at timestamptz NOT NULL DEFAULT now()
    );
  `)
  await scrubLegacyAuditRows(sequelize)
  await sequelize.query('ALTER TABLE audit_events VALIDATE CONSTRAINT audit_events_actor_by_id')
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  // The scrubbed audit values are gone for good; only the list goes.
  await sequelize.query('DROP TABLE IF EXISTS erasures')
}
