import type { MigrationFn } from '../migrator'

/**
 * Incidents (the incidents domain).
 *
 * - `incidents`: a burst, uncommanded launch, injury, near miss or other event, reported by any member:
 *   when and where, optionally the launch event and the vessel (any vessel of the club, not only the
 *   reporter's), what happened, and — for an injury — personal details that only officers see. The
 *   safety officer reviews it (notes, findings, actions) and closes it; closing never releases the
 *   vessel (that is the quarantine's release, then a new passing proof test).
 * - `incident_people`: the members involved (the reporter need not be one).
 * - `photos.incident_id`: incident photos go through the private photo upload (purpose `incident`).
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE TABLE incidents (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      reported_by_membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      kind text NOT NULL CHECK (kind IN ('burst', 'uncommanded_launch', 'injury', 'near_miss', 'other')),
      happened_at timestamptz NOT NULL,
      place text NOT NULL CHECK (length(btrim(place)) BETWEEN 1 AND 200),
      event_id uuid,
      vessel_id uuid,
      what_happened text NOT NULL CHECK (length(btrim(what_happened)) BETWEEN 1 AND 5000),
      injury_details text CHECK (length(injury_details) <= 5000),
      status text NOT NULL DEFAULT 'open' CHECK (status IN ('open', 'closed')),
      review_notes text NOT NULL DEFAULT '' CHECK (length(review_notes) <= 5000),
      findings text NOT NULL DEFAULT '' CHECK (length(findings) <= 5000),
      actions text NOT NULL DEFAULT '' CHECK (length(actions) <= 5000),
      closed_at timestamptz,
      closed_by_membership_id uuid REFERENCES memberships(id) ON DELETE RESTRICT,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (id, club_id),
      FOREIGN KEY (event_id, club_id) REFERENCES launch_events (id, club_id) ON DELETE RESTRICT,
      CHECK (injury_details IS NULL OR kind = 'injury'),
      CHECK ((status = 'closed') = (closed_at IS NOT NULL)),
      CHECK ((closed_at IS NULL) = (closed_by_membership_id IS NULL))
    );
    ALTER TABLE incidents ADD CONSTRAINT incidents_vessel_fk FOREIGN KEY (vessel_id) REFERENCES vessels(id) ON DELETE RESTRICT;
    CREATE INDEX incidents_club_status ON incidents (club_id, status, happened_at DESC);
    CREATE INDEX incidents_vessel ON incidents (vessel_id) WHERE vessel_id IS NOT NULL;
    CREATE INDEX incidents_reporter ON incidents (reported_by_membership_id);

    CREATE TABLE incident_people (
      incident_id uuid NOT NULL,
      club_id uuid NOT NULL,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      PRIMARY KEY (incident_id, membership_id),
      FOREIGN KEY (incident_id, club_id) REFERENCES incidents (id, club_id) ON DELETE CASCADE
    );
    CREATE INDEX incident_people_member ON incident_people (membership_id);

    ALTER TABLE photos ADD COLUMN incident_id uuid REFERENCES incidents(id) ON DELETE RESTRICT;
    ALTER TABLE photos DROP CONSTRAINT IF EXISTS photos_purpose_check;
    ALTER TABLE photos ADD CONSTRAINT photos_purpose_check CHECK (purpose IN ('build', 'gauge', 'coupon', 'incident'));
    -- Build and gauge photos name a vessel; coupon and incident photos need not; an incident photo names its incident.
    ALTER TABLE photos DROP CONSTRAINT IF EXISTS photos_check;
    ALTER TABLE photos ADD CONSTRAINT photos_vessel_check CHECK (purpose IN ('coupon', 'incident') OR vessel_id IS NOT NULL);
    ALTER TABLE photos ADD CONSTRAINT photos_incident_check CHECK ((purpose = 'incident') = (incident_id IS NOT NULL));
    CREATE INDEX photos_incident_idx ON photos (incident_id) WHERE incident_id IS NOT NULL;
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP INDEX IF EXISTS photos_incident_idx;
    ALTER TABLE photos DROP CONSTRAINT IF EXISTS photos_incident_check;
    ALTER TABLE photos DROP CONSTRAINT IF EXISTS photos_vessel_check;
    ALTER TABLE photos ADD CONSTRAINT photos_check CHECK (purpose = 'coupon' OR vessel_id IS NOT NULL);
    ALTER TABLE photos DROP CONSTRAINT IF EXISTS photos_purpose_check;
    ALTER TABLE photos DROP COLUMN IF EXISTS incident_id;
    ALTER TABLE photos ADD CONSTRAINT photos_purpose_check CHECK (purpose IN ('build', 'gauge', 'coupon'));
    DROP TABLE IF EXISTS incident_people;
    DROP TABLE IF EXISTS incidents;
  `)
}
