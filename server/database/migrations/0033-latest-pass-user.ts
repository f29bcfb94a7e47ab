import type { MigrationFn } from '../migrator'

/**
 * `training_latest_passes.user_id`: the member's account, copied from the membership, so the audit
 * desk reads a member's name with one probe of `users` instead of joining every membership of the club
 * first. A BEFORE INSERT trigger fills it from the membership (the refresh of migration 0031 is
 * unchanged), and the copy cannot drift: `(membership_id, user_id)` references `memberships (id,
 * user_id)` (a new unique key), so a row naming another account is refused and a change of account
 * would cascade.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE memberships ADD CONSTRAINT memberships_id_user_id_key UNIQUE (id, user_id);
    ALTER TABLE training_latest_passes ADD COLUMN user_id uuid;
    UPDATE training_latest_passes t SET user_id = m.user_id FROM memberships m WHERE m.id = t.membership_id;
    ALTER TABLE training_latest_passes ALTER COLUMN user_id SET NOT NULL,
      ADD CONSTRAINT training_latest_passes_membership_user_fkey FOREIGN KEY (membership_id, user_id)
        REFERENCES memberships (id, user_id) ON UPDATE CASCADE ON DELETE RESTRICT;

    CREATE FUNCTION training_latest_passes_user() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      SELECT m.user_id INTO NEW.user_id FROM memberships m WHERE m.id = NEW.membership_id;
      RETURN NEW;
    END $$;
    CREATE TRIGGER training_latest_passes_user BEFORE INSERT OR UPDATE OF membership_id ON training_latest_passes
      FOR EACH ROW EXECUTE FUNCTION training_latest_passes_user();
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TRIGGER IF EXISTS training_latest_passes_user ON training_latest_passes;
    DROP FUNCTION IF EXISTS training_latest_passes_user();
    ALTER TABLE training_latest_passes DROP COLUMN IF EXISTS user_id;
    ALTER TABLE memberships DROP CONSTRAINT IF EXISTS memberships_id_user_id_key;
  `)
}
