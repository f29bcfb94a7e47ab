import type { MigrationFn } from '../migrator'

/**
 * `training_latest_passes.user_id`: the member's account, copied from the membership, so the audit
 * desk reads a member's name with one probe of `users` instead of joining every membership of the club
 * first. The copy cannot drift: `(membership_id, user_id)` references `memberships (id, user_id)` (a
 * new unique key), so a row naming another account is refused and a change of account would cascade.
 * The refresh (migration 0031) now writes it; the trigger and the lock order are unchanged.
 */
const refresh = (withUser: boolean) => `
    CREATE OR REPLACE FUNCTION training_latest_refresh(membership uuid, course uuid) RETURNS void LANGUAGE plpgsql AS $$
    DECLARE
      held boolean;
      last record;
    BEGIN
      PERFORM 1 FROM training_latest_passes WHERE membership_id = membership AND course_id = course FOR UPDATE;
      held := FOUND;
      SELECT * INTO last FROM training_latest_pick(membership, course);
      IF NOT FOUND THEN
        DELETE FROM training_latest_passes WHERE membership_id = membership AND course_id = course;
        RETURN;
      END IF;
      INSERT INTO training_latest_passes (membership_id, course_id, club_id, record_id, expires_on, retraining${withUser ? ', user_id' : ''})
        VALUES (membership, course, last.club_id, last.record_id, last.expires_on, last.retraining${withUser ? ', (SELECT m.user_id FROM memberships m WHERE m.id = membership)' : ''})
        ON CONFLICT (membership_id, course_id) DO UPDATE SET club_id = EXCLUDED.club_id, record_id = EXCLUDED.record_id,
          expires_on = EXCLUDED.expires_on, retraining = EXCLUDED.retraining;
      -- The row was new when read: another transaction may have written one meanwhile (its record unseen
      -- above). The row is locked now, so a fresh read sees whatever that transaction committed.
      IF NOT held THEN
        UPDATE training_latest_passes t SET club_id = p.club_id, record_id = p.record_id, expires_on = p.expires_on, retraining = p.retraining
          FROM training_latest_pick(membership, course) p
         WHERE t.membership_id = membership AND t.course_id = course AND t.record_id <> p.record_id;
      END IF;
    END $$;`

export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE memberships ADD CONSTRAINT memberships_id_user_id_key UNIQUE (id, user_id);
    ALTER TABLE training_latest_passes ADD COLUMN user_id uuid;
    UPDATE training_latest_passes t SET user_id = m.user_id FROM memberships m WHERE m.id = t.membership_id;
    ALTER TABLE training_latest_passes ALTER COLUMN user_id SET NOT NULL,
      ADD CONSTRAINT training_latest_passes_membership_user_fkey FOREIGN KEY (membership_id, user_id)
        REFERENCES memberships (id, user_id) ON UPDATE CASCADE ON DELETE RESTRICT;
    ${refresh(true)}
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    ${refresh(false)}
    ALTER TABLE training_latest_passes DROP COLUMN IF EXISTS user_id;
    ALTER TABLE memberships DROP CONSTRAINT IF EXISTS memberships_id_user_id_key;
  `)
}
