import type { MigrationFn } from '../migrator'

/**
 * Clubs, accounts, memberships, waivers, one-time tokens, the notice queue and the append-only
 * audit trail. Rules live in the database too: unique keys, foreign keys, checks and a trigger.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE EXTENSION IF NOT EXISTS pgcrypto;

    CREATE TABLE clubs (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      name text NOT NULL CHECK (length(name) BETWEEN 1 AND 200),
      tag_prefix text NOT NULL CHECK (tag_prefix ~ '^[A-Z]{2,5}$'),
      time_zone text NOT NULL DEFAULT 'UTC',
      units text NOT NULL DEFAULT 'bar' CHECK (units IN ('bar', 'psi')),
      public_url text NOT NULL CHECK (public_url ~ '^https?://'),
      grace_days integer NOT NULL DEFAULT 30 CHECK (grace_days BETWEEN 0 AND 365),
      policy jsonb NOT NULL DEFAULT '{}'::jsonb CHECK (jsonb_typeof(policy) = 'object'),
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    );

    CREATE TABLE users (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      email text NOT NULL CHECK (length(email) BETWEEN 3 AND 254),
      name text NOT NULL CHECK (length(name) BETWEEN 1 AND 120),
      password_hash text NOT NULL,
      email_verified_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    );
    -- E-mail addresses are unique whatever their case.
    CREATE UNIQUE INDEX users_email_lower_key ON users (lower(email));

    CREATE TABLE memberships (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      user_id uuid NOT NULL REFERENCES users(id) ON DELETE RESTRICT,
      roles text[] NOT NULL DEFAULT ARRAY['member']::text[]
        CHECK (roles <@ ARRAY['member', 'instructor', 'safety_officer', 'admin']::text[] AND 'member' = ANY (roles)),
      approved_at timestamptz,
      paid_through date,
      suspended_at timestamptz,
      suspended_reason text,
      resigned_at timestamptz,
      birth_date date,
      guardian_name text,
      guardian_email text,
      guardian_consent_at timestamptz,
      phone text,
      emergency_contact_name text,
      emergency_contact_phone text,
      unit_preference text NOT NULL DEFAULT 'bar' CHECK (unit_preference IN ('bar', 'psi')),
      notice_opt_outs text[] NOT NULL DEFAULT ARRAY[]::text[],
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (club_id, user_id),
      CHECK (suspended_at IS NULL OR suspended_reason IS NOT NULL)
    );
    CREATE INDEX memberships_club_paid_through_idx ON memberships (club_id, paid_through);
    CREATE INDEX memberships_roles_idx ON memberships USING gin (roles);
    CREATE INDEX memberships_user_idx ON memberships (user_id);
    -- The directory searches names and e-mails by prefix/substring; trigram indexes keep that fast.
    CREATE EXTENSION IF NOT EXISTS pg_trgm;
    CREATE INDEX users_name_trgm_idx ON users USING gin (lower(name) gin_trgm_ops);
    CREATE INDEX users_email_trgm_idx ON users USING gin (lower(email) gin_trgm_ops);
    CREATE INDEX users_name_lower_idx ON users (lower(name));

    CREATE TABLE waivers (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      version integer NOT NULL CHECK (version >= 1),
      title text NOT NULL CHECK (length(title) BETWEEN 1 AND 200),
      body text NOT NULL CHECK (length(body) BETWEEN 1 AND 20000),
      published_at timestamptz NOT NULL DEFAULT now(),
      published_by uuid REFERENCES memberships(id),
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (club_id, version)
    );

    CREATE TABLE waiver_acceptances (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      waiver_id uuid NOT NULL REFERENCES waivers(id) ON DELETE RESTRICT,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      typed_name text NOT NULL CHECK (length(typed_name) BETWEEN 1 AND 120),
      accepted_at timestamptz NOT NULL DEFAULT now(),
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (waiver_id, membership_id)
    );

    CREATE TABLE action_tokens (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
      membership_id uuid REFERENCES memberships(id) ON DELETE CASCADE,
      purpose text NOT NULL CHECK (purpose IN ('verify_email', 'reset_password', 'guardian_consent')),
      token_hash text NOT NULL UNIQUE,
      expires_at timestamptz NOT NULL,
      used_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    );

    CREATE TABLE notices (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      kind text NOT NULL CHECK (kind ~ '^[a-z_]{2,60}$'),
      subject_key text NOT NULL DEFAULT '',
      due_on date NOT NULL,
      to_email text NOT NULL,
      subject text NOT NULL,
      text_body text NOT NULL,
      html_body text NOT NULL,
      status text NOT NULL DEFAULT 'queued' CHECK (status IN ('queued', 'sending', 'sent', 'failed', 'skipped')),
      attempts integer NOT NULL DEFAULT 0 CHECK (attempts >= 0),
      next_attempt_at timestamptz NOT NULL DEFAULT now(),
      locked_until timestamptz,
      last_error text,
      sent_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      -- Each notice at most once per member, kind, subject and due date.
      UNIQUE (membership_id, kind, subject_key, due_on)
    );
    CREATE INDEX notices_due_idx ON notices (status, next_attempt_at);
    CREATE INDEX notices_club_created_idx ON notices (club_id, created_at DESC);

    CREATE TABLE audit_events (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      actor_membership_id uuid REFERENCES memberships(id),
      actor_name text NOT NULL,
      action text NOT NULL,
      subject_type text NOT NULL,
      subject_id uuid,
      before jsonb,
      after jsonb,
      reason text,
      created_at timestamptz NOT NULL DEFAULT now()
    );
    CREATE INDEX audit_events_club_created_idx ON audit_events (club_id, created_at DESC);
    CREATE INDEX audit_events_subject_idx ON audit_events (subject_id);

    -- The audit trail is append-only: the database itself refuses to change or remove a row.
    CREATE FUNCTION audit_events_refuse_change() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION 'audit_events is append-only: % refused', TG_OP USING ERRCODE = 'insufficient_privilege';
    END;
    $$;
    CREATE TRIGGER audit_events_no_update_delete BEFORE UPDATE OR DELETE ON audit_events
      FOR EACH ROW EXECUTE FUNCTION audit_events_refuse_change();
    CREATE TRIGGER audit_events_no_truncate BEFORE TRUNCATE ON audit_events
      FOR EACH STATEMENT EXECUTE FUNCTION audit_events_refuse_change();
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TABLE IF EXISTS audit_events, notices, action_tokens, waiver_acceptances, waivers, memberships, users, clubs CASCADE;
    DROP FUNCTION IF EXISTS audit_events_refuse_change();
  `)
}
