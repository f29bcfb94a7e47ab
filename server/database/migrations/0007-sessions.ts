import type { MigrationFn } from '../migrator'

/**
 * Sessions kept in PostgreSQL: the sealed cookie carries only a row's id, and every request checks
 * the row (not revoked, within the absolute lifetime and the idle timeout) in the query that loads
 * the member. Sign-out revokes one row; a password reset revokes all of the account's rows, a
 * suspension or resignation all of the membership's. This replaces `users.session_version` (dropped).
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE TABLE sessions (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE CASCADE,
      created_at timestamptz NOT NULL DEFAULT now(),
      last_seen_at timestamptz NOT NULL DEFAULT now(),
      address text NOT NULL CHECK (length(address) <= 64),
      user_agent text CHECK (length(user_agent) <= 512),
      revoked_at timestamptz,
      revoke_reason text CHECK (revoke_reason IN ('signed_out', 'signed_out_elsewhere', 'password_reset', 'suspended', 'resigned')),
      CONSTRAINT sessions_revoked_with_reason CHECK ((revoked_at IS NULL) = (revoke_reason IS NULL))
    );
    CREATE INDEX sessions_user_active_idx ON sessions (user_id, last_seen_at DESC) WHERE revoked_at IS NULL;
    CREATE INDEX sessions_membership_idx ON sessions (membership_id);
    ALTER TABLE users DROP COLUMN session_version;
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE users ADD COLUMN IF NOT EXISTS session_version integer NOT NULL DEFAULT 0;
    DROP TABLE IF EXISTS sessions;
  `)
}
