import type { MigrationFn } from '../migrator'

/**
 * Courses and training records (the training domain; its sessions and enrolments come in this
 * migration too).
 *
 * - `courses`: the club's courses, each with a stable `code` the rules name (a station requires
 *   `composite_ppe`), a validity in months, an optional theory pass mark and whether a practical
 *   sign-off is needed. Every club starts with the same seven (a trigger adds them to a new club,
 *   whichever way it is created); its officers may then rename and re-time them.
 * - `training_records`: one per trainee and course taken. A record always holds the trainee's name,
 *   the date(s), the subject, the trainer, the result and the expiry — the table refuses one without
 *   them (29 CFR 1910.132(f)(4) asks for name, dates and subject). Nobody is their own trainer or
 *   issuer. A record may be flagged "retraining required" with a reason; it then is not current.
 * - `training_sessions`: a course held by an instructor at a place and time (timestamptz, entered in
 *   the club's time zone) for at most `capacity` trainees; issued once, for the whole session.
 * - `training_enrolments`: who enrolled, in order of arrival (`arrival`, taken under the session's row
 *   lock), enrolled or waiting; a withdrawal keeps the row. The attendance and assessment live on it
 *   until the session's records are issued. Nobody signs off their own practical.
 * - `training_evidence`: files (PDF, JPEG, PNG) behind a member's record, kept in the uploads folder
 *   under the row's id; a course taken elsewhere needs at least one.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE TABLE courses (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      code text NOT NULL CHECK (code ~ '^[a-z][a-z0-9_]{1,39}$'),
      name text NOT NULL CHECK (length(btrim(name)) BETWEEN 1 AND 120),
      description text NOT NULL DEFAULT '' CHECK (length(description) <= 2000),
      validity_months integer NOT NULL CHECK (validity_months BETWEEN 1 AND 120),
      pass_mark_percent integer CHECK (pass_mark_percent BETWEEN 0 AND 100),
      practical_required boolean NOT NULL DEFAULT false,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (club_id, code),
      UNIQUE (club_id, name),
      UNIQUE (id, club_id)
    );

    CREATE TABLE training_records (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      course_id uuid NOT NULL,
      trainee_name text NOT NULL CHECK (length(btrim(trainee_name)) > 0),
      subject text NOT NULL CHECK (length(btrim(subject)) > 0),
      trained_from date NOT NULL,
      trained_to date NOT NULL,
      trainer_name text NOT NULL CHECK (length(btrim(trainer_name)) > 0),
      trainer_membership_id uuid REFERENCES memberships(id) ON DELETE RESTRICT,
      issued_by_membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      result text NOT NULL CHECK (result IN ('pass', 'fail')),
      theory_score_percent integer CHECK (theory_score_percent BETWEEN 0 AND 100),
      practical_signed_off boolean,
      expires_on date NOT NULL,
      taken_elsewhere boolean NOT NULL DEFAULT false,
      retraining_required_at timestamptz,
      retraining_reason text CHECK (retraining_reason IN ('changed_workshop', 'changed_ppe', 'skill_not_retained')),
      retraining_note text CHECK (length(retraining_note) <= 500),
      retraining_flagged_by_membership_id uuid REFERENCES memberships(id) ON DELETE RESTRICT,
      created_at timestamptz NOT NULL DEFAULT now(),
      FOREIGN KEY (course_id, club_id) REFERENCES courses (id, club_id) ON DELETE RESTRICT,
      CHECK (trained_to >= trained_from),
      CHECK (expires_on > trained_to),
      CHECK (trainer_membership_id IS DISTINCT FROM membership_id),
      CHECK (issued_by_membership_id <> membership_id),
      CHECK ((retraining_required_at IS NULL) = (retraining_reason IS NULL)),
      CHECK ((retraining_required_at IS NULL) = (retraining_flagged_by_membership_id IS NULL))
    );
    CREATE INDEX training_records_member_course ON training_records (membership_id, course_id, trained_to DESC);
    CREATE INDEX training_records_club_course ON training_records (club_id, course_id, expires_on);

    CREATE FUNCTION add_starting_courses(club uuid) RETURNS void LANGUAGE sql AS $$
      INSERT INTO courses (club_id, code, name, validity_months, pass_mark_percent, practical_required, description) VALUES
        (club, 'safety_briefing', 'Club safety briefing', 12, NULL, false, 'The club''s rules, the launch field, and who decides what.'),
        (club, 'composite_ppe', 'Composite handling and PPE', 24, 80, true, 'Resin and hardener, gloves, eye protection and ventilation: when and which PPE, putting it on and off, its limits, care and disposal.'),
        (club, 'respirator_fit', 'Respirator fit test', 12, NULL, true, 'A tight-fitting respirator fitted and tested before first use and at least every 12 months, for sanding composites.'),
        (club, 'pressure_safety', 'Pressure safety and fill procedure', 12, 80, true, 'Stored energy, standoff, proof tests, the fill procedure and its refusals.'),
        (club, 'rig_operator', 'Hydrostatic test rig operator', 24, 80, true, 'Running the water-filled proof-test rig: set-up, barrier, hold, reading the gauge, venting.'),
        (club, 'range_safety', 'Range safety officer', 24, 80, true, 'Running the launch line: clearances, countdown, misfires and recovery.'),
        (club, 'first_aid', 'First aid', 36, NULL, true, 'First aid at the workshop and the launch field.')
      ON CONFLICT (club_id, code) DO NOTHING
    $$;
    CREATE FUNCTION clubs_add_starting_courses() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      PERFORM add_starting_courses(NEW.id);
      RETURN NEW;
    END $$;
    CREATE TRIGGER clubs_starting_courses AFTER INSERT ON clubs FOR EACH ROW EXECUTE FUNCTION clubs_add_starting_courses();
    SELECT add_starting_courses(id) FROM clubs;

    CREATE TABLE training_sessions (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      course_id uuid NOT NULL,
      instructor_membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      starts_at timestamptz NOT NULL,
      ends_at timestamptz NOT NULL,
      place text NOT NULL CHECK (length(btrim(place)) BETWEEN 1 AND 120),
      capacity integer NOT NULL CHECK (capacity BETWEEN 1 AND 200),
      issued_at timestamptz,
      issued_by_membership_id uuid REFERENCES memberships(id) ON DELETE RESTRICT,
      created_at timestamptz NOT NULL DEFAULT now(),
      FOREIGN KEY (course_id, club_id) REFERENCES courses (id, club_id) ON DELETE RESTRICT,
      UNIQUE (id, club_id),
      CHECK (ends_at > starts_at AND ends_at - starts_at <= interval '14 days'),
      CHECK ((issued_at IS NULL) = (issued_by_membership_id IS NULL))
    );
    CREATE INDEX training_sessions_club_start ON training_sessions (club_id, starts_at);

    CREATE TABLE training_enrolments (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL,
      session_id uuid NOT NULL,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      arrival bigint GENERATED ALWAYS AS IDENTITY,
      status text NOT NULL CHECK (status IN ('enrolled', 'waiting', 'withdrawn')),
      enrolled_at timestamptz NOT NULL DEFAULT now(),
      moved_up_at timestamptz,
      withdrawn_at timestamptz,
      attended boolean,
      theory_score_percent integer CHECK (theory_score_percent BETWEEN 0 AND 100),
      practical_signed_off boolean,
      signed_off_by_membership_id uuid REFERENCES memberships(id) ON DELETE RESTRICT,
      record_id uuid REFERENCES training_records(id) ON DELETE RESTRICT,
      FOREIGN KEY (session_id, club_id) REFERENCES training_sessions (id, club_id) ON DELETE CASCADE,
      CHECK ((status = 'withdrawn') = (withdrawn_at IS NOT NULL)),
      CHECK (signed_off_by_membership_id IS DISTINCT FROM membership_id),
      CHECK (practical_signed_off IS NOT TRUE OR signed_off_by_membership_id IS NOT NULL)
    );
    -- One live place per member and session; a withdrawn row stays as history.
    CREATE UNIQUE INDEX training_enrolments_one_live ON training_enrolments (session_id, membership_id) WHERE status <> 'withdrawn';
    CREATE INDEX training_enrolments_session_arrival ON training_enrolments (session_id, arrival);
    CREATE INDEX training_enrolments_member ON training_enrolments (membership_id);

    CREATE TABLE training_evidence (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      record_id uuid REFERENCES training_records(id) ON DELETE RESTRICT,
      uploaded_by_membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      content_type text NOT NULL CHECK (content_type IN ('application/pdf', 'image/jpeg', 'image/png')),
      byte_size integer NOT NULL CHECK (byte_size > 0 AND byte_size <= 10485760),
      created_at timestamptz NOT NULL DEFAULT now()
    );
    CREATE INDEX training_evidence_member ON training_evidence (membership_id, created_at);
    CREATE INDEX training_evidence_record ON training_evidence (record_id);
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TRIGGER IF EXISTS clubs_starting_courses ON clubs;
    DROP FUNCTION IF EXISTS clubs_add_starting_courses();
    DROP FUNCTION IF EXISTS add_starting_courses(uuid);
    DROP TABLE IF EXISTS training_evidence;
    DROP TABLE IF EXISTS training_enrolments;
    DROP TABLE IF EXISTS training_sessions;
    DROP TABLE IF EXISTS training_records;
    DROP TABLE IF EXISTS courses;
  `)
}
