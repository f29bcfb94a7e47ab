import type { MigrationFn } from '../migrator'

/**
 * Records brought in by a roster import. An imported account has no password until its member follows
 * the welcome link (an account without one cannot sign in). Imported training records and tiers arrive
 * unconfirmed (`confirmed_at` NULL): every eligibility rule and the fill gate ignore them until an
 * instructor (records) or a `tiers.grant` holder (tiers) confirms each. Rows written before this
 * migration, and every row written by the app's own forms, are confirmed when written.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE users ALTER COLUMN password_hash DROP NOT NULL;
    ALTER TABLE training_records
      ADD COLUMN imported boolean NOT NULL DEFAULT false,
      ADD COLUMN confirmed_at timestamptz DEFAULT now(),
      ADD COLUMN confirmed_by_membership_id uuid REFERENCES memberships(id) ON DELETE RESTRICT,
      ADD CONSTRAINT training_records_confirmed_unless_imported CHECK (imported OR confirmed_at IS NOT NULL);
    ALTER TABLE member_tiers
      ADD COLUMN imported boolean NOT NULL DEFAULT false,
      ADD COLUMN imported_assessor_name text CHECK (length(btrim(imported_assessor_name)) BETWEEN 1 AND 200),
      ADD COLUMN confirmed_at timestamptz DEFAULT now(),
      ADD COLUMN confirmed_by_membership_id uuid REFERENCES memberships(id) ON DELETE RESTRICT,
      ADD CONSTRAINT member_tiers_confirmed_unless_imported CHECK (imported OR confirmed_at IS NOT NULL);
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE member_tiers DROP COLUMN imported, DROP COLUMN imported_assessor_name, DROP COLUMN confirmed_at, DROP COLUMN confirmed_by_membership_id;
    ALTER TABLE training_records DROP COLUMN imported, DROP COLUMN confirmed_at, DROP COLUMN confirmed_by_membership_id;
    ALTER TABLE users ALTER COLUMN password_hash SET NOT NULL;
  `)
}
