import type { MigrationFn } from '../migrator'

/**
 * Running tallies the audit desk reads instead of counting the whole fill log on every request, kept
 * by triggers in the same transaction as the row that changes them (so they are never behind):
 *
 * - `launch_event_fill_tallies`: per launch event with fills, its allowed, refused and supervised
 *   fills (the fill log is append-only, so an insert is the only change).
 * - `launch_event_tier_fills`: per launch event and tier, its allowed fills. A fill now records the
 *   tier it was made at (`fills.tier_rank`: the filler's highest valid tier as the gate saw it, NULL
 *   for none); fills logged before this migration get the highest tier in force on the event's day.
 * - `vessel_proof_tallies`: per vessel with a passed proof, the day of its last pass and the allowed
 *   fills at events held on or after it. The desk uses it only to pick the few vessels whose proof may
 *   lapse soon; their standing itself comes from the rule's SQL mirror over the proof tests, fills and
 *   vessel events. Recording a fill and a proof test both lock the vessel row first, so the two
 *   triggers never race for one vessel.
 *
 * And indexes for the desk's other reads: passed training records by expiry, suspended tiers, and the
 * vessel events that end a proof (by club and day, for the same pick).
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE fills ADD COLUMN tier_rank integer CHECK (tier_rank BETWEEN 0 AND 9);
    ALTER TABLE fills DISABLE TRIGGER fills_no_update_delete;
    UPDATE fills f SET tier_rank = (SELECT max(t.rank) FROM member_tiers t WHERE t.membership_id = f.membership_id
      AND t.first_granted_on <= f.held_on AND t.expires_on >= f.held_on AND t.revoked_at IS NULL AND t.confirmed_at IS NOT NULL);
    ALTER TABLE fills ENABLE TRIGGER fills_no_update_delete;

    CREATE TABLE launch_event_tier_fills (
      event_id uuid NOT NULL REFERENCES launch_events(id) ON DELETE RESTRICT,
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      tier_rank integer,
      fills integer NOT NULL CHECK (fills >= 0)
    );
    CREATE UNIQUE INDEX launch_event_tier_fills_key ON launch_event_tier_fills (event_id, (coalesce(tier_rank, -1)));
    INSERT INTO launch_event_tier_fills (event_id, club_id, tier_rank, fills)
      SELECT event_id, club_id, tier_rank, count(*) FROM fills WHERE allowed GROUP BY event_id, club_id, tier_rank;

    CREATE TABLE launch_event_fill_tallies (
      event_id uuid PRIMARY KEY REFERENCES launch_events(id) ON DELETE RESTRICT,
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      fills integer NOT NULL DEFAULT 0 CHECK (fills >= 0),
      refused integer NOT NULL DEFAULT 0 CHECK (refused >= 0),
      supervised integer NOT NULL DEFAULT 0 CHECK (supervised >= 0)
    );
    CREATE INDEX launch_event_fill_tallies_club ON launch_event_fill_tallies (club_id);
    INSERT INTO launch_event_fill_tallies (event_id, club_id, fills, refused, supervised)
      SELECT event_id, club_id, count(*) FILTER (WHERE allowed), count(*) FILTER (WHERE NOT allowed),
             count(*) FILTER (WHERE allowed AND supervisor_membership_id IS NOT NULL)
        FROM fills GROUP BY event_id, club_id;

    CREATE TABLE vessel_proof_tallies (
      vessel_id uuid PRIMARY KEY REFERENCES vessels(id) ON DELETE RESTRICT,
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      last_pass_on date NOT NULL,
      fills_since_pass integer NOT NULL CHECK (fills_since_pass >= 0)
    );
    CREATE INDEX vessel_proof_tallies_pass ON vessel_proof_tallies (club_id, last_pass_on);
    CREATE INDEX vessel_proof_tallies_fills ON vessel_proof_tallies (club_id, fills_since_pass);

    CREATE FUNCTION vessel_proof_tally_refresh(vessel uuid) RETURNS void LANGUAGE plpgsql AS $$
    DECLARE last record;
    BEGIN
      SELECT p.club_id, p.tested_on INTO last FROM proof_tests p WHERE p.vessel_id = vessel AND p.result = 'pass'
        ORDER BY p.tested_on DESC LIMIT 1;
      IF NOT FOUND THEN
        DELETE FROM vessel_proof_tallies WHERE vessel_id = vessel;
        RETURN;
      END IF;
      INSERT INTO vessel_proof_tallies (vessel_id, club_id, last_pass_on, fills_since_pass)
        VALUES (vessel, last.club_id, last.tested_on,
                (SELECT count(*) FROM fills f WHERE f.vessel_id = vessel AND f.allowed AND f.held_on >= last.tested_on))
        ON CONFLICT (vessel_id) DO UPDATE SET last_pass_on = EXCLUDED.last_pass_on, fills_since_pass = EXCLUDED.fills_since_pass;
    END $$;
    SELECT vessel_proof_tally_refresh(v.id) FROM (SELECT DISTINCT vessel_id AS id FROM proof_tests WHERE result = 'pass') v;

    CREATE FUNCTION proof_tests_tally() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF TG_OP <> 'INSERT' THEN PERFORM vessel_proof_tally_refresh(OLD.vessel_id); END IF;
      IF TG_OP <> 'DELETE' THEN PERFORM vessel_proof_tally_refresh(NEW.vessel_id); END IF;
      RETURN NULL;
    END $$;
    CREATE TRIGGER proof_tests_tally AFTER INSERT OR UPDATE OR DELETE ON proof_tests FOR EACH ROW EXECUTE FUNCTION proof_tests_tally();

    -- Per statement, from the inserted rows: one upsert per event however many fills one INSERT adds.
    CREATE FUNCTION fills_tally() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      INSERT INTO launch_event_fill_tallies AS t (event_id, club_id, fills, refused, supervised)
        SELECT event_id, club_id, count(*) FILTER (WHERE allowed), count(*) FILTER (WHERE NOT allowed),
               count(*) FILTER (WHERE allowed AND supervisor_membership_id IS NOT NULL)
          FROM new_fills GROUP BY event_id, club_id
        ON CONFLICT (event_id) DO UPDATE SET fills = t.fills + EXCLUDED.fills, refused = t.refused + EXCLUDED.refused,
                                             supervised = t.supervised + EXCLUDED.supervised;
      INSERT INTO launch_event_tier_fills AS t (event_id, club_id, tier_rank, fills)
        SELECT event_id, club_id, tier_rank, count(*) FROM new_fills WHERE allowed GROUP BY event_id, club_id, tier_rank
        ON CONFLICT (event_id, (coalesce(tier_rank, -1))) DO UPDATE SET fills = t.fills + EXCLUDED.fills;
      UPDATE vessel_proof_tallies v SET fills_since_pass = v.fills_since_pass + n.n
        FROM (SELECT f.vessel_id, count(*)::int AS n FROM new_fills f JOIN vessel_proof_tallies p ON p.vessel_id = f.vessel_id
               WHERE f.allowed AND f.held_on >= p.last_pass_on GROUP BY f.vessel_id) n
       WHERE v.vessel_id = n.vessel_id;
      RETURN NULL;
    END $$;
    CREATE TRIGGER fills_tally AFTER INSERT ON fills REFERENCING NEW TABLE AS new_fills FOR EACH STATEMENT EXECUTE FUNCTION fills_tally();

    CREATE INDEX training_records_club_pass_expiry ON training_records (club_id, expires_on) WHERE result = 'pass';
    CREATE INDEX member_tiers_club_suspended ON member_tiers (club_id) WHERE suspended_at IS NOT NULL;
    CREATE INDEX vessel_events_club_proof_ending ON vessel_events (club_id, happened_on)
      WHERE kind IN ('repair', 'modification', 'damage', 'crash', 'incident', 'heat_exposure');
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP INDEX IF EXISTS vessel_events_club_proof_ending;
    DROP INDEX IF EXISTS member_tiers_club_suspended;
    DROP INDEX IF EXISTS training_records_club_pass_expiry;
    DROP TRIGGER IF EXISTS fills_tally ON fills;
    DROP FUNCTION IF EXISTS fills_tally();
    DROP TRIGGER IF EXISTS proof_tests_tally ON proof_tests;
    DROP FUNCTION IF EXISTS proof_tests_tally();
    DROP FUNCTION IF EXISTS vessel_proof_tally_refresh(uuid);
    DROP TABLE IF EXISTS vessel_proof_tallies;
    DROP TABLE IF EXISTS launch_event_fill_tallies;
    DROP TABLE IF EXISTS launch_event_tier_fills;
    ALTER TABLE fills DROP COLUMN IF EXISTS tier_rank;
  `)
}
