import type { MigrationFn } from '../migrator'

/**
 * Audit events name their actor by membership id only; the trail joins the actor's current name at
 * read time, so taking another officer's name for a while cannot pass one's own acts off as theirs,
 * and an erasure request finds no copied name in a row that can never change. Existing rows keep what
 * they hold (the table refuses UPDATE): `actor_name` becomes optional, and a check (NOT VALID: it
 * binds new rows only) keeps a name out of every new row that has an actor id. Rows without one
 * (the system, a guardian using their e-mailed link) carry a fixed label, never a person's name.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE audit_events ALTER COLUMN actor_name DROP NOT NULL;
    ALTER TABLE audit_events ADD CONSTRAINT audit_events_actor_by_id
      CHECK (actor_membership_id IS NULL OR actor_name IS NULL) NOT VALID;
    CREATE INDEX audit_events_actor_idx ON audit_events (actor_membership_id);
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  // actor_name stays optional: the rows written since hold none, and none of them may be changed.
  await sequelize.query(`
    DROP INDEX IF EXISTS audit_events_actor_idx;
    ALTER TABLE audit_events DROP CONSTRAINT IF EXISTS audit_events_actor_by_id;
  `)
}
