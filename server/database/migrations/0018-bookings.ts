import type { MigrationFn } from '../migrator'

/**
 * The workshop calendar: stations, their bookings and each member's private calendar link.
 *
 * - `stations`: a club's benches, cure-rack slots, booth and rig, each with the courses (by code) a
 *   member must be current in, the longest booking, opening hours per weekday (Monday first, wall-clock
 *   `HH:MM` in the club's time zone, `null` = closed) and whether only adults may book it.
 * - `bookings`: one station for a half-open range `[starts_at, ends_at)`. The exclusion constraint
 *   `bookings_no_overlap` (btree_gist: `=` on the station, `&&` on the range) makes two live bookings of
 *   one station overlap impossible, whatever the application does; cancelled ones are left out, and
 *   `[)` lets one booking end at the very instant the next starts. A cure hold points at its bench
 *   booking (`cure_for_booking_id`).
 * - `booking_feed_tokens`: the SHA-256 of each member's calendar-feed token, never the token itself.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE EXTENSION IF NOT EXISTS btree_gist;

    CREATE TABLE stations (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      name text NOT NULL CHECK (length(btrim(name)) BETWEEN 1 AND 80),
      kind text NOT NULL CHECK (kind IN ('laminating_bench', 'cure_rack_slot', 'sanding_booth', 'test_rig')),
      required_courses text[] NOT NULL DEFAULT '{}' CHECK (cardinality(required_courses) <= 10),
      max_booking_minutes integer NOT NULL CHECK (max_booking_minutes BETWEEN 15 AND 10080),
      opening_hours jsonb NOT NULL CHECK (jsonb_typeof(opening_hours) = 'array' AND jsonb_array_length(opening_hours) = 7),
      adults_only boolean NOT NULL DEFAULT false,
      position integer NOT NULL DEFAULT 0,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (club_id, name),
      UNIQUE (id, club_id)
    );

    CREATE TABLE bookings (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      station_id uuid NOT NULL,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      starts_at timestamptz NOT NULL,
      ends_at timestamptz NOT NULL,
      during tstzrange GENERATED ALWAYS AS (tstzrange(starts_at, ends_at, '[)')) STORED,
      note text NOT NULL DEFAULT '' CHECK (length(note) <= 200),
      cure_for_booking_id uuid REFERENCES bookings(id) ON DELETE RESTRICT,
      created_at timestamptz NOT NULL DEFAULT now(),
      cancelled_at timestamptz,
      cancelled_by_membership_id uuid REFERENCES memberships(id) ON DELETE RESTRICT,
      cancel_reason text CHECK (length(cancel_reason) <= 500),
      FOREIGN KEY (station_id, club_id) REFERENCES stations (id, club_id) ON DELETE RESTRICT,
      CHECK (ends_at > starts_at),
      CHECK ((cancelled_at IS NULL) = (cancelled_by_membership_id IS NULL)),
      CONSTRAINT bookings_no_overlap EXCLUDE USING gist (station_id WITH =, during WITH &&) WHERE (cancelled_at IS NULL)
    );
    CREATE INDEX bookings_member ON bookings (membership_id, starts_at);
    CREATE INDEX bookings_club_time ON bookings (club_id, starts_at);
    CREATE INDEX bookings_cure_for ON bookings (cure_for_booking_id) WHERE cure_for_booking_id IS NOT NULL;

    CREATE TABLE booking_feed_tokens (
      membership_id uuid PRIMARY KEY REFERENCES memberships(id) ON DELETE CASCADE,
      token_sha256 text NOT NULL UNIQUE CHECK (token_sha256 ~ '^[0-9a-f]{64}$'),
      created_at timestamptz NOT NULL DEFAULT now()
    );
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TABLE IF EXISTS booking_feed_tokens;
    DROP TABLE IF EXISTS bookings;
    DROP TABLE IF EXISTS stations;
  `)
}
