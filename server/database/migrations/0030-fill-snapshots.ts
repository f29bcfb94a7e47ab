import type { MigrationFn } from '../migrator'

/**
 * The launch-side fill page without a network (decision 0049):
 *
 * - `club_signing_keys`: each club's ECDSA P-256 key pair for signing fill snapshots, made once on first
 *   need. Kept here so it is in every backup (a restored club keeps verifying its devices' snapshots);
 *   it is the club's, not a person's.
 * - `fill_snapshot_devices`: one row per device holding a snapshot of an event — who downloaded it
 *   (the caller of every fill the device records) and, once the staff release it, when.
 * - `fill_reservations`: the fills each vessel's fill-count limit has left that a device holds for the
 *   event (`reserved`) and how many of them it has used. Online fills and other devices see only what
 *   no unreleased device still holds.
 * - `fills` gains what a fill recorded offline carries: the device's own id for it (unique per club:
 *   a queue sent twice records nothing twice), the device, the moment it was recorded there, a digest
 *   of what the device sent (the same id with another body is a conflict), and the server's reasons
 *   when the device allowed a fill the server would have refused (`flagged_reasons`: the fill happened,
 *   so it is logged as allowed and counts toward the vessel's limit, but never toward a tier).
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE TABLE club_signing_keys (
      club_id uuid PRIMARY KEY REFERENCES clubs(id) ON DELETE RESTRICT,
      public_jwk jsonb NOT NULL CHECK (public_jwk->>'kty' = 'EC' AND public_jwk->>'crv' = 'P-256'),
      private_pkcs8 text NOT NULL CHECK (length(private_pkcs8) > 0),
      created_at timestamptz NOT NULL DEFAULT now()
    );

    CREATE TABLE fill_snapshot_devices (
      event_id uuid NOT NULL,
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      device_id uuid NOT NULL,
      issued_by_membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      issued_at timestamptz NOT NULL DEFAULT now(),
      released_at timestamptz,
      PRIMARY KEY (event_id, device_id),
      FOREIGN KEY (event_id, club_id) REFERENCES launch_events (id, club_id) ON DELETE RESTRICT,
      CHECK (released_at IS NULL OR released_at >= issued_at)
    );

    CREATE TABLE fill_reservations (
      event_id uuid NOT NULL,
      device_id uuid NOT NULL,
      vessel_id uuid NOT NULL REFERENCES vessels(id) ON DELETE RESTRICT,
      reserved integer NOT NULL CHECK (reserved >= 0),
      used integer NOT NULL DEFAULT 0 CHECK (used >= 0),
      PRIMARY KEY (event_id, device_id, vessel_id),
      FOREIGN KEY (event_id, device_id) REFERENCES fill_snapshot_devices (event_id, device_id) ON DELETE CASCADE
    );
    CREATE INDEX fill_reservations_vessel ON fill_reservations (vessel_id);

    ALTER TABLE fills
      ADD COLUMN client_id uuid,
      ADD COLUMN device_id uuid,
      ADD COLUMN recorded_offline_at timestamptz,
      ADD COLUMN client_digest text,
      ADD COLUMN flagged_reasons jsonb,
      ADD CONSTRAINT fills_offline_complete CHECK (
        (client_id IS NULL AND device_id IS NULL AND recorded_offline_at IS NULL AND client_digest IS NULL)
        OR (client_id IS NOT NULL AND device_id IS NOT NULL AND recorded_offline_at IS NOT NULL AND client_digest IS NOT NULL)),
      ADD CONSTRAINT fills_flagged_offline CHECK (flagged_reasons IS NULL OR (
        client_id IS NOT NULL AND allowed AND jsonb_typeof(flagged_reasons) = 'array' AND jsonb_array_length(flagged_reasons) > 0));
    CREATE UNIQUE INDEX fills_client_id ON fills (club_id, client_id) WHERE client_id IS NOT NULL;
    CREATE INDEX fills_event_flagged ON fills (event_id) WHERE flagged_reasons IS NOT NULL;
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP INDEX IF EXISTS fills_event_flagged;
    DROP INDEX IF EXISTS fills_client_id;
    ALTER TABLE fills DROP CONSTRAINT IF EXISTS fills_flagged_offline, DROP CONSTRAINT IF EXISTS fills_offline_complete,
      DROP COLUMN IF EXISTS flagged_reasons, DROP COLUMN IF EXISTS client_digest, DROP COLUMN IF EXISTS recorded_offline_at,
      DROP COLUMN IF EXISTS device_id, DROP COLUMN IF EXISTS client_id;
    DROP TABLE IF EXISTS fill_reservations;
    DROP TABLE IF EXISTS fill_snapshot_devices;
    DROP TABLE IF EXISTS club_signing_keys;
  `)
}
