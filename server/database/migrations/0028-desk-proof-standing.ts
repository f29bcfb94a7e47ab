import type { MigrationFn } from '../migrator'

/**
 * What the audit desk needs to read the proof standing without re-deriving it per vessel, and the
 * latest passed training record without a sort per member and course:
 *
 * - `vessel_proof_tallies.ends_on`: the first proof-ending vessel event (repair, modification, damage,
 *   crash, incident, heat exposure) dated after the last pass, or NULL. With the last pass day and the
 *   allowed fills since, which the tally already keeps, the standing is arithmetic on one row: the
 *   interval and the fill limit of the club's policy are applied when the desk reads it (so a policy
 *   change needs no refresh). A proof test refreshes it (the tally's refresh), and so does a vessel
 *   event of those kinds. Recording a vessel event locks the vessel row first, as a fill and a proof
 *   test do, so the triggers never race for one vessel.
 * - `vessel_proof_tallies.construction` and `in_service`: the vessel's construction (which picks the
 *   policy's interval) and whether it is in service, copied by the refresh and by a trigger when the
 *   vessel's construction or state changes, so the vessels whose interval ends by a day are an index
 *   range per construction and a count never reads the vessels.
 * - memberships: an index of the club's resigned ones (the desk leaves their rows out).
 * - an index of passed, confirmed training records in the order "latest" is decided in (training
 *   day, then entry), so "is there a later pass of this course" is one index probe.
 */
const KINDS = `'repair', 'modification', 'damage', 'crash', 'incident', 'heat_exposure'`

export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE vessel_proof_tallies ADD COLUMN ends_on date, ADD COLUMN construction text, ADD COLUMN in_service boolean;
    UPDATE vessel_proof_tallies t SET construction = v.construction, in_service = v.state = 'in_service' FROM vessels v WHERE v.id = t.vessel_id;
    ALTER TABLE vessel_proof_tallies ALTER COLUMN construction SET NOT NULL, ALTER COLUMN in_service SET NOT NULL,
      ADD CONSTRAINT vessel_proof_tallies_construction_check
        CHECK (construction IN ('single_bottle', 'spliced_bottles', 'overwrapped_liner', 'mandrel_tube', 'other'));
    CREATE INDEX vessel_proof_tallies_ends ON vessel_proof_tallies (club_id, ends_on) WHERE ends_on IS NOT NULL;
    CREATE INDEX vessel_proof_tallies_construction_pass ON vessel_proof_tallies (club_id, construction, last_pass_on);

    CREATE FUNCTION vessel_proof_tally_ends(vessel uuid) RETURNS void LANGUAGE sql AS $$
      UPDATE vessel_proof_tallies t SET ends_on = (SELECT min(e.happened_on) FROM vessel_events e
        WHERE e.vessel_id = t.vessel_id AND e.kind IN (${KINDS}) AND e.happened_on > t.last_pass_on)
       WHERE t.vessel_id = vessel;
    $$;

    CREATE OR REPLACE FUNCTION vessel_proof_tally_refresh(vessel uuid) RETURNS void LANGUAGE plpgsql AS $$
    DECLARE last record;
    BEGIN
      SELECT p.club_id, p.tested_on INTO last FROM proof_tests p WHERE p.vessel_id = vessel AND p.result = 'pass'
        ORDER BY p.tested_on DESC LIMIT 1;
      IF NOT FOUND THEN
        DELETE FROM vessel_proof_tallies WHERE vessel_id = vessel;
        RETURN;
      END IF;
      INSERT INTO vessel_proof_tallies (vessel_id, club_id, last_pass_on, fills_since_pass, construction, in_service)
        SELECT vessel, last.club_id, last.tested_on,
               (SELECT count(*) FROM fills f WHERE f.vessel_id = vessel AND f.allowed AND f.held_on >= last.tested_on),
               v.construction, v.state = 'in_service'
          FROM vessels v WHERE v.id = vessel
        ON CONFLICT (vessel_id) DO UPDATE SET last_pass_on = EXCLUDED.last_pass_on, fills_since_pass = EXCLUDED.fills_since_pass,
                                              construction = EXCLUDED.construction, in_service = EXCLUDED.in_service;
      PERFORM vessel_proof_tally_ends(vessel);
    END $$;

    UPDATE vessel_proof_tallies t SET ends_on = (SELECT min(e.happened_on) FROM vessel_events e
      WHERE e.vessel_id = t.vessel_id AND e.kind IN (${KINDS}) AND e.happened_on > t.last_pass_on);

    CREATE FUNCTION vessel_events_tally() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF TG_OP <> 'INSERT' AND OLD.kind IN (${KINDS}) THEN PERFORM vessel_proof_tally_ends(OLD.vessel_id); END IF;
      IF TG_OP <> 'DELETE' AND NEW.kind IN (${KINDS}) THEN PERFORM vessel_proof_tally_ends(NEW.vessel_id); END IF;
      RETURN NULL;
    END $$;
    CREATE TRIGGER vessel_events_tally AFTER INSERT OR UPDATE OR DELETE ON vessel_events FOR EACH ROW EXECUTE FUNCTION vessel_events_tally();

    CREATE FUNCTION vessels_tally_copy() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      UPDATE vessel_proof_tallies SET construction = NEW.construction, in_service = NEW.state = 'in_service' WHERE vessel_id = NEW.id;
      RETURN NULL;
    END $$;
    CREATE TRIGGER vessels_tally_copy AFTER UPDATE OF construction, state ON vessels FOR EACH ROW
      WHEN (OLD.construction IS DISTINCT FROM NEW.construction OR OLD.state IS DISTINCT FROM NEW.state) EXECUTE FUNCTION vessels_tally_copy();

    CREATE INDEX memberships_club_resigned ON memberships (club_id) WHERE resigned_at IS NOT NULL;
    CREATE INDEX training_records_latest_pass ON training_records (membership_id, course_id, trained_to DESC, created_at DESC, id DESC)
      WHERE result = 'pass' AND confirmed_at IS NOT NULL;
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP INDEX IF EXISTS training_records_latest_pass;
    DROP INDEX IF EXISTS memberships_club_resigned;
    DROP TRIGGER IF EXISTS vessels_tally_copy ON vessels;
    DROP FUNCTION IF EXISTS vessels_tally_copy();
    DROP TRIGGER IF EXISTS vessel_events_tally ON vessel_events;
    DROP FUNCTION IF EXISTS vessel_events_tally();
    CREATE OR REPLACE FUNCTION vessel_proof_tally_refresh(vessel uuid) RETURNS void LANGUAGE plpgsql AS $$
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
    DROP FUNCTION IF EXISTS vessel_proof_tally_ends(uuid);
    DROP INDEX IF EXISTS vessel_proof_tallies_construction_pass;
    DROP INDEX IF EXISTS vessel_proof_tallies_ends;
    ALTER TABLE vessel_proof_tallies DROP COLUMN IF EXISTS ends_on, DROP COLUMN IF EXISTS construction, DROP COLUMN IF EXISTS in_service;
  `)
}
