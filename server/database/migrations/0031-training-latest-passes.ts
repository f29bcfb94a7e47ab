import type { MigrationFn } from '../migrator'

/**
 * `training_latest_passes`: per member and course, their latest passed, confirmed training record (by
 * training day, then entry, then id: the order the training pages use), with its expiry and whether
 * it is flagged for retraining. The audit desk reads the records expiring in a window as an index
 * range of this table instead of probing "is there a later pass" for each record.
 *
 * Kept by a row trigger on `training_records` in the transaction that writes the record: an insert, a
 * delete (an unconfirmed import discarded) and an update of any column the choice or the copy reads
 * (result, confirmation, training day, expiry, retraining flag, member, course) refresh the member's
 * row for that course. The refresh locks that row before it reads the records (and reads again once
 * it holds the lock of a row it created), so two transactions writing records of the same member and
 * course refresh one after the other and the second sees the first's record. A row lock, not an
 * advisory lock: a bulk import of thousands of records in one transaction would fill the lock table.
 * An unconfirmed import stays out until it is confirmed.
 *
 * Ids, dates and a flag only: no personal text (the erasure's free-text step finds nothing here).
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE TABLE training_latest_passes (
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      course_id uuid NOT NULL,
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      record_id uuid NOT NULL UNIQUE REFERENCES training_records(id) ON DELETE CASCADE,
      expires_on date NOT NULL,
      retraining boolean NOT NULL,
      PRIMARY KEY (membership_id, course_id),
      FOREIGN KEY (course_id, club_id) REFERENCES courses (id, club_id) ON DELETE RESTRICT
    );
    CREATE INDEX training_latest_passes_due ON training_latest_passes (club_id, expires_on) WHERE NOT retraining;

    CREATE FUNCTION training_latest_pick(membership uuid, course uuid) RETURNS TABLE (club_id uuid, record_id uuid, expires_on date, retraining boolean)
      LANGUAGE sql STABLE AS $$
      SELECT r.club_id, r.id, r.expires_on, r.retraining_required_at IS NOT NULL
        FROM training_records r WHERE r.membership_id = membership AND r.course_id = course AND r.result = 'pass' AND r.confirmed_at IS NOT NULL
       ORDER BY r.trained_to DESC, r.created_at DESC, r.id DESC LIMIT 1;
    $$;

    CREATE FUNCTION training_latest_refresh(membership uuid, course uuid) RETURNS void LANGUAGE plpgsql AS $$
    DECLARE
      held boolean;
      last record;
    BEGIN
      PERFORM 1 FROM training_latest_passes WHERE membership_id = membership AND course_id = course FOR UPDATE;
      held := FOUND;
      SELECT * INTO last FROM training_latest_pick(membership, course);
      IF NOT FOUND THEN
        DELETE FROM training_latest_passes WHERE membership_id = membership AND course_id = course;
        RETURN;
      END IF;
      INSERT INTO training_latest_passes (membership_id, course_id, club_id, record_id, expires_on, retraining)
        VALUES (membership, course, last.club_id, last.record_id, last.expires_on, last.retraining)
        ON CONFLICT (membership_id, course_id) DO UPDATE SET club_id = EXCLUDED.club_id, record_id = EXCLUDED.record_id,
          expires_on = EXCLUDED.expires_on, retraining = EXCLUDED.retraining;
      -- The row was new when read: another transaction may have written one meanwhile (its record unseen
      -- above). The row is locked now, so a fresh read sees whatever that transaction committed.
      IF NOT held THEN
        UPDATE training_latest_passes t SET club_id = p.club_id, record_id = p.record_id, expires_on = p.expires_on, retraining = p.retraining
          FROM training_latest_pick(membership, course) p
         WHERE t.membership_id = membership AND t.course_id = course AND t.record_id <> p.record_id;
      END IF;
    END $$;

    CREATE FUNCTION training_records_latest() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF TG_OP <> 'INSERT' THEN PERFORM training_latest_refresh(OLD.membership_id, OLD.course_id); END IF;
      IF TG_OP = 'INSERT' OR (TG_OP = 'UPDATE' AND (OLD.membership_id, OLD.course_id) IS DISTINCT FROM (NEW.membership_id, NEW.course_id)) THEN
        PERFORM training_latest_refresh(NEW.membership_id, NEW.course_id);
      END IF;
      RETURN NULL;
    END $$;
    CREATE TRIGGER training_records_latest AFTER INSERT OR DELETE OR UPDATE OF membership_id, course_id, club_id, result, confirmed_at,
      trained_to, created_at, expires_on, retraining_required_at ON training_records FOR EACH ROW EXECUTE FUNCTION training_records_latest();

    INSERT INTO training_latest_passes (membership_id, course_id, club_id, record_id, expires_on, retraining)
      SELECT DISTINCT ON (r.membership_id, r.course_id) r.membership_id, r.course_id, r.club_id, r.id, r.expires_on, r.retraining_required_at IS NOT NULL
        FROM training_records r WHERE r.result = 'pass' AND r.confirmed_at IS NOT NULL
       ORDER BY r.membership_id, r.course_id, r.trained_to DESC, r.created_at DESC, r.id DESC;
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TRIGGER IF EXISTS training_records_latest ON training_records;
    DROP FUNCTION IF EXISTS training_records_latest();
    DROP FUNCTION IF EXISTS training_latest_refresh(uuid, uuid);
    DROP FUNCTION IF EXISTS training_latest_pick(uuid, uuid);
    DROP TABLE IF EXISTS training_latest_passes;
  `)
}
