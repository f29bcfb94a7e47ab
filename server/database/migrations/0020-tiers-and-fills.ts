import type { MigrationFn } from '../migrator'

/**
 * Pressure tiers, fill stations, launch events and the fill log (the tiers, events and fills domains).
 *
 * - `tier_levels`: the club's tier table, ranks 0–4 (T0 … T4), added to every club by a trigger with
 *   the starting defaults. A tier's fill cap rises strictly with its rank (a deferred constraint
 *   trigger checks the whole table at commit, so an edit may pass through an unordered state); T0's
 *   cap is 0. Prerequisites: courses current at the grant, the tier below held for a minimum number
 *   of months, logged fills, supervised fills (optionally only those above a pressure), a minimum
 *   age and whether an own vessel must have passed a witnessed proof. `renewal_min_fills` is the
 *   number of fills logged within the validity that a re-sign-off needs.
 * - `member_tiers`: one row per member and rank: held since (`first_granted_on`), last signed
 *   (grant or renewal), expiry, and the safety officer's suspension or revocation.
 * - `tier_signoffs`: every grant, renewal and the club's initial T4 (append-only history); nobody
 *   signs off their own tier; only the initial grant has no assessor.
 * - `fill_passes`: the member's fill pass; issuing a new one replaces the old (one live pass each).
 * - `fill_stations`: launchers at the field (not the workshop's stations), with the rated pressure of
 *   their lowest-rated part and one gauge with its calibration date and interval.
 * - `launch_events`, with the stations they use, their staff and the members registered.
 * - `fills`: every fill and every refused attempt, with the decision, its reasons, the computed air
 *   charge and who recorded or supervised it. Append-only.
 * - `vessel_policies`: the equipment factor (never below 3) and the junior cap (a tier rank).
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE vessel_policies
      ADD COLUMN equipment_factor numeric(4, 2) NOT NULL DEFAULT 3 CHECK (equipment_factor >= 3 AND equipment_factor <= 10),
      ADD COLUMN junior_cap_rank integer NOT NULL DEFAULT 1 CHECK (junior_cap_rank BETWEEN 0 AND 4);

    CREATE TABLE tier_levels (
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      rank integer NOT NULL CHECK (rank BETWEEN 0 AND 4),
      name text NOT NULL CHECK (length(btrim(name)) BETWEEN 1 AND 60),
      fill_cap_bar numeric(6, 2) NOT NULL CHECK (fill_cap_bar >= 0 AND fill_cap_bar <= 100),
      validity_months integer NOT NULL CHECK (validity_months BETWEEN 1 AND 120),
      required_course_codes text[] NOT NULL DEFAULT '{}',
      held_below_months integer NOT NULL DEFAULT 0 CHECK (held_below_months BETWEEN 0 AND 120),
      min_logged_fills integer NOT NULL DEFAULT 0 CHECK (min_logged_fills BETWEEN 0 AND 1000),
      min_supervised_fills integer NOT NULL DEFAULT 0 CHECK (min_supervised_fills BETWEEN 0 AND 1000),
      supervised_fills_above_bar numeric(6, 2) CHECK (supervised_fills_above_bar >= 0 AND supervised_fills_above_bar <= 100),
      min_age_years integer CHECK (min_age_years BETWEEN 0 AND 99),
      own_vessel_proof_required boolean NOT NULL DEFAULT false,
      renewal_min_fills integer NOT NULL DEFAULT 0 CHECK (renewal_min_fills BETWEEN 0 AND 1000),
      updated_at timestamptz NOT NULL DEFAULT now(),
      PRIMARY KEY (club_id, rank),
      UNIQUE (club_id, name),
      CHECK (rank > 0 OR fill_cap_bar = 0)
    );

    CREATE FUNCTION tier_caps_rise() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF EXISTS (SELECT 1 FROM (SELECT fill_cap_bar, lag(fill_cap_bar) OVER (ORDER BY rank) AS below
                   FROM tier_levels WHERE club_id = NEW.club_id) t WHERE t.below IS NOT NULL AND t.fill_cap_bar <= t.below) THEN
        RAISE EXCEPTION 'tier fill caps must rise strictly with rank' USING ERRCODE = '23514', CONSTRAINT = 'tier_caps_rise';
      END IF;
      RETURN NULL;
    END $$;
    CREATE CONSTRAINT TRIGGER tier_levels_caps_rise AFTER INSERT OR UPDATE ON tier_levels
      DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION tier_caps_rise();

    CREATE FUNCTION add_starting_tiers(club uuid) RETURNS void LANGUAGE sql AS $$
      INSERT INTO tier_levels (club_id, rank, name, fill_cap_bar, validity_months, required_course_codes, held_below_months,
                               min_logged_fills, min_supervised_fills, supervised_fills_above_bar, min_age_years, own_vessel_proof_required, renewal_min_fills) VALUES
        (club, 0, 'Crew', 0, 12, '{safety_briefing}', 0, 0, 0, NULL, NULL, false, 0),
        (club, 1, 'Bottle', 6, 24, '{pressure_safety}', 0, 0, 3, NULL, NULL, false, 4),
        (club, 2, 'Reinforced', 10, 24, '{rig_operator}', 3, 10, 5, NULL, NULL, false, 4),
        (club, 3, 'Composite', 17, 12, '{composite_ppe}', 6, 15, 5, 10, 18, true, 6),
        (club, 4, 'Senior', 25, 12, '{range_safety}', 12, 20, 0, NULL, 18, false, 6)
      ON CONFLICT (club_id, rank) DO NOTHING
    $$;
    CREATE FUNCTION clubs_add_starting_tiers() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      PERFORM add_starting_tiers(NEW.id);
      RETURN NEW;
    END $$;
    CREATE TRIGGER clubs_starting_tiers AFTER INSERT ON clubs FOR EACH ROW EXECUTE FUNCTION clubs_add_starting_tiers();
    SELECT add_starting_tiers(id) FROM clubs;

    CREATE TABLE member_tiers (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      rank integer NOT NULL,
      first_granted_on date NOT NULL,
      signed_on date NOT NULL,
      expires_on date NOT NULL,
      initial boolean NOT NULL DEFAULT false,
      suspended_at timestamptz,
      suspension_reason text CHECK (length(btrim(suspension_reason)) BETWEEN 1 AND 500),
      suspended_by_membership_id uuid REFERENCES memberships(id) ON DELETE RESTRICT,
      revoked_at timestamptz,
      revocation_reason text CHECK (length(btrim(revocation_reason)) BETWEEN 1 AND 500),
      revoked_by_membership_id uuid REFERENCES memberships(id) ON DELETE RESTRICT,
      updated_at timestamptz NOT NULL DEFAULT now(),
      FOREIGN KEY (club_id, rank) REFERENCES tier_levels (club_id, rank) ON DELETE RESTRICT,
      UNIQUE (membership_id, rank),
      CHECK (signed_on >= first_granted_on),
      CHECK (expires_on > signed_on),
      CHECK ((suspended_at IS NULL) = (suspension_reason IS NULL)),
      CHECK ((suspended_at IS NULL) = (suspended_by_membership_id IS NULL)),
      CHECK ((revoked_at IS NULL) = (revocation_reason IS NULL)),
      CHECK ((revoked_at IS NULL) = (revoked_by_membership_id IS NULL))
    );
    CREATE INDEX member_tiers_club_expiry ON member_tiers (club_id, expires_on);

    CREATE TABLE tier_signoffs (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      member_tier_id uuid NOT NULL REFERENCES member_tiers(id) ON DELETE RESTRICT,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      rank integer NOT NULL CHECK (rank BETWEEN 0 AND 4),
      kind text NOT NULL CHECK (kind IN ('grant', 'renewal', 'initial')),
      signed_on date NOT NULL,
      expires_on date NOT NULL,
      assessor_membership_id uuid REFERENCES memberships(id) ON DELETE RESTRICT,
      notes text NOT NULL DEFAULT '' CHECK (length(notes) <= 2000),
      created_at timestamptz NOT NULL DEFAULT now(),
      CHECK ((kind = 'initial') = (assessor_membership_id IS NULL)),
      CHECK (kind <> 'initial' OR rank = 4),
      CHECK (assessor_membership_id IS DISTINCT FROM membership_id),
      CHECK (expires_on > signed_on)
    );
    CREATE INDEX tier_signoffs_member ON tier_signoffs (membership_id, created_at);
    CREATE INDEX tier_signoffs_club_rank ON tier_signoffs (club_id, rank);

    CREATE TABLE tier_evidence (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      signoff_id uuid NOT NULL REFERENCES tier_signoffs(id) ON DELETE RESTRICT,
      uploaded_by_membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      content_type text NOT NULL CHECK (content_type IN ('application/pdf', 'image/jpeg', 'image/png')),
      byte_size integer NOT NULL CHECK (byte_size > 0 AND byte_size <= 10485760),
      created_at timestamptz NOT NULL DEFAULT now()
    );
    CREATE INDEX tier_evidence_signoff ON tier_evidence (signoff_id);

    CREATE TABLE fill_passes (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      issued_at timestamptz NOT NULL DEFAULT now(),
      expires_at timestamptz NOT NULL,
      replaced_at timestamptz,
      CHECK (expires_at > issued_at)
    );
    CREATE UNIQUE INDEX fill_passes_one_live ON fill_passes (membership_id) WHERE replaced_at IS NULL;

    CREATE TABLE fill_stations (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      name text NOT NULL CHECK (length(btrim(name)) BETWEEN 1 AND 80),
      description text NOT NULL DEFAULT '' CHECK (length(description) <= 1000),
      lowest_part_rating_bar numeric(6, 2) NOT NULL CHECK (lowest_part_rating_bar > 0 AND lowest_part_rating_bar <= 1000),
      gauge_name text NOT NULL CHECK (length(btrim(gauge_name)) BETWEEN 1 AND 80),
      gauge_calibrated_on date NOT NULL,
      gauge_interval_months integer NOT NULL CHECK (gauge_interval_months BETWEEN 1 AND 60),
      retired_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (club_id, name),
      UNIQUE (id, club_id)
    );

    CREATE TABLE launch_events (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      held_on date NOT NULL,
      site text NOT NULL CHECK (length(btrim(site)) BETWEEN 1 AND 120),
      pressure_cap_bar numeric(6, 2) NOT NULL CHECK (pressure_cap_bar > 0 AND pressure_cap_bar <= 100),
      competition boolean NOT NULL DEFAULT false,
      notes text NOT NULL DEFAULT '' CHECK (length(notes) <= 2000),
      cancelled_at timestamptz,
      cancel_reason text CHECK (length(btrim(cancel_reason)) BETWEEN 1 AND 500),
      created_by_membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (id, club_id),
      CHECK ((cancelled_at IS NULL) = (cancel_reason IS NULL))
    );
    CREATE INDEX launch_events_club_day ON launch_events (club_id, held_on);

    CREATE TABLE launch_event_stations (
      event_id uuid NOT NULL,
      club_id uuid NOT NULL,
      station_id uuid NOT NULL,
      PRIMARY KEY (event_id, station_id),
      FOREIGN KEY (event_id, club_id) REFERENCES launch_events (id, club_id) ON DELETE CASCADE,
      FOREIGN KEY (station_id, club_id) REFERENCES fill_stations (id, club_id) ON DELETE RESTRICT
    );

    CREATE TABLE launch_event_staff (
      event_id uuid NOT NULL,
      club_id uuid NOT NULL,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      PRIMARY KEY (event_id, membership_id),
      FOREIGN KEY (event_id, club_id) REFERENCES launch_events (id, club_id) ON DELETE CASCADE
    );
    CREATE INDEX launch_event_staff_member ON launch_event_staff (membership_id);

    CREATE TABLE launch_event_registrations (
      event_id uuid NOT NULL,
      club_id uuid NOT NULL,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      registered_at timestamptz NOT NULL DEFAULT now(),
      walk_in boolean NOT NULL DEFAULT false,
      added_by_membership_id uuid REFERENCES memberships(id) ON DELETE RESTRICT,
      withdrawn_at timestamptz,
      PRIMARY KEY (event_id, membership_id),
      FOREIGN KEY (event_id, club_id) REFERENCES launch_events (id, club_id) ON DELETE CASCADE
    );
    CREATE INDEX launch_event_registrations_member ON launch_event_registrations (membership_id);

    CREATE TABLE fills (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      event_id uuid NOT NULL,
      held_on date NOT NULL,
      station_id uuid NOT NULL,
      membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      vessel_id uuid NOT NULL REFERENCES vessels(id) ON DELETE RESTRICT,
      recorded_by_membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      supervisor_membership_id uuid REFERENCES memberships(id) ON DELETE RESTRICT,
      pressure_bar double precision NOT NULL CHECK (pressure_bar > 0 AND pressure_bar <= 1000),
      entered_pressure double precision NOT NULL CHECK (entered_pressure > 0),
      entered_unit text NOT NULL CHECK (entered_unit IN ('bar', 'psi', 'kPa', 'MPa')),
      water_volume_l numeric(8, 3) NOT NULL CHECK (water_volume_l >= 0),
      allowed boolean NOT NULL,
      permitted_max_bar double precision NOT NULL CHECK (permitted_max_bar >= 0),
      limiting_factor text NOT NULL CHECK (limiting_factor IN ('TIER', 'VESSEL_RATING', 'EVENT_CAP', 'EQUIPMENT_RATING')),
      reasons jsonb NOT NULL DEFAULT '[]' CHECK (jsonb_typeof(reasons) = 'array'),
      stored_energy_j double precision NOT NULL CHECK (stored_energy_j >= 0),
      tnt_equivalent_kg double precision NOT NULL CHECK (tnt_equivalent_kg >= 0),
      minimum_distance_m double precision NOT NULL CHECK (minimum_distance_m >= 0),
      created_at timestamptz NOT NULL DEFAULT now(),
      FOREIGN KEY (event_id, club_id) REFERENCES launch_events (id, club_id) ON DELETE RESTRICT,
      FOREIGN KEY (station_id, club_id) REFERENCES fill_stations (id, club_id) ON DELETE RESTRICT,
      CHECK (allowed = (jsonb_array_length(reasons) = 0)),
      CHECK (supervisor_membership_id IS NULL OR supervisor_membership_id = recorded_by_membership_id),
      CHECK (supervisor_membership_id IS DISTINCT FROM membership_id)
    );
    CREATE INDEX fills_vessel_allowed ON fills (vessel_id, held_on) WHERE allowed;
    CREATE INDEX fills_member ON fills (membership_id, created_at);
    CREATE INDEX fills_event ON fills (event_id, created_at);

    CREATE FUNCTION refuse_append_only_change() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION '% is append-only: % refused', TG_TABLE_NAME, TG_OP USING ERRCODE = 'insufficient_privilege';
    END $$;
    CREATE TRIGGER fills_no_update_delete BEFORE UPDATE OR DELETE ON fills FOR EACH ROW EXECUTE FUNCTION refuse_append_only_change();
    CREATE TRIGGER tier_signoffs_no_update_delete BEFORE UPDATE OR DELETE ON tier_signoffs FOR EACH ROW EXECUTE FUNCTION refuse_append_only_change();
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TABLE IF EXISTS fills;
    DROP TABLE IF EXISTS tier_evidence;
    DROP TABLE IF EXISTS tier_signoffs;
    DROP FUNCTION IF EXISTS refuse_append_only_change();
    DROP TABLE IF EXISTS launch_event_registrations;
    DROP TABLE IF EXISTS launch_event_staff;
    DROP TABLE IF EXISTS launch_event_stations;
    DROP TABLE IF EXISTS launch_events;
    DROP TABLE IF EXISTS fill_stations;
    DROP TABLE IF EXISTS fill_passes;
    DROP TABLE IF EXISTS member_tiers;
    DROP TRIGGER IF EXISTS clubs_starting_tiers ON clubs;
    DROP FUNCTION IF EXISTS clubs_add_starting_tiers();
    DROP FUNCTION IF EXISTS add_starting_tiers(uuid);
    DROP TABLE IF EXISTS tier_levels;
    DROP FUNCTION IF EXISTS tier_caps_rise();
    ALTER TABLE vessel_policies DROP COLUMN IF EXISTS equipment_factor, DROP COLUMN IF EXISTS junior_cap_rank;
  `)
}
