import type { MigrationFn } from '../migrator'

/**
 * Proof tests and what happens to a vessel between them.
 *
 * - `vessel_policies`: one row per club (a club without one has the starting policy): the proof
 *   margin (never below 1.25), the proof interval per construction, the fill limits for bottles and
 *   laminates, the cure wait before a proof, whether air proof tests are allowed, the distance rule
 *   and the hand-layup process factor of the burst estimate.
 * - `proof_tests`: every witnessed proof test, kept as recorded (append-only). A pass carries the
 *   margin it was rated with and the rated fill; any other result names where it failed.
 * - `vessel_events`: what happened to a vessel outside a proof test (repair, damage, heat exposure …,
 *   quarantine, release, retirement), append-only. A repair or modification may carry a new layup date.
 * - `vessels.proof_requested_at`: the owner asked for a proof test; instructors see the queue.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE TABLE vessel_policies (
      club_id uuid PRIMARY KEY REFERENCES clubs(id) ON DELETE RESTRICT,
      margin_ratio numeric(4, 2) NOT NULL DEFAULT 1.5 CHECK (margin_ratio >= 1.25 AND margin_ratio <= 4),
      interval_months_single_bottle integer NOT NULL DEFAULT 12 CHECK (interval_months_single_bottle BETWEEN 1 AND 60),
      interval_months_spliced_bottles integer NOT NULL DEFAULT 6 CHECK (interval_months_spliced_bottles BETWEEN 1 AND 60),
      interval_months_overwrapped_liner integer NOT NULL DEFAULT 12 CHECK (interval_months_overwrapped_liner BETWEEN 1 AND 60),
      interval_months_mandrel_tube integer NOT NULL DEFAULT 12 CHECK (interval_months_mandrel_tube BETWEEN 1 AND 60),
      interval_months_other integer NOT NULL DEFAULT 12 CHECK (interval_months_other BETWEEN 1 AND 60),
      fill_limit_bottle integer NOT NULL DEFAULT 10 CHECK (fill_limit_bottle BETWEEN 1 AND 1000),
      fill_limit_laminate integer NOT NULL DEFAULT 25 CHECK (fill_limit_laminate BETWEEN 1 AND 1000),
      cure_wait_days integer NOT NULL DEFAULT 7 CHECK (cure_wait_days BETWEEN 0 AND 90),
      air_tests_allowed boolean NOT NULL DEFAULT false,
      distance_rule text NOT NULL DEFAULT 'tnt' CHECK (distance_rule IN ('tnt', '2tnt')),
      k_process numeric(4, 3) NOT NULL DEFAULT 0.5 CHECK (k_process > 0 AND k_process <= 1),
      updated_at timestamptz NOT NULL DEFAULT now()
    );
    INSERT INTO vessel_policies (club_id) SELECT id FROM clubs;

    ALTER TABLE vessels ADD COLUMN proof_requested_at timestamptz;

    CREATE TABLE proof_tests (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      vessel_id uuid NOT NULL REFERENCES vessels(id) ON DELETE RESTRICT,
      witness_membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      tested_on date NOT NULL,
      medium text NOT NULL DEFAULT 'water' CHECK (medium IN ('water', 'air')),
      pressure_bar numeric(6, 2) NOT NULL CHECK (pressure_bar > 0 AND pressure_bar <= 300),
      hold_s integer NOT NULL DEFAULT 120 CHECK (hold_s BETWEEN 1 AND 3600),
      result text NOT NULL CHECK (result IN ('pass', 'leak', 'permanent_deformation', 'burst')),
      failure_location text CHECK (failure_location IN ('wall', 'splice', 'end_fitting', 'nozzle_bond')),
      notes text CHECK (length(notes) <= 2000),
      gauge_photo_id uuid REFERENCES photos(id) ON DELETE RESTRICT,
      margin_ratio numeric(4, 2) CHECK (margin_ratio >= 1.25),
      rated_fill_bar numeric(6, 2) CHECK (rated_fill_bar > 0),
      created_at timestamptz NOT NULL DEFAULT now(),
      -- A pass fails nowhere; every other result says where it failed.
      CHECK ((result = 'pass') = (failure_location IS NULL)),
      -- Only a pass rates the vessel, with the margin it used.
      CHECK ((result = 'pass') = (rated_fill_bar IS NOT NULL)),
      CHECK ((rated_fill_bar IS NULL) = (margin_ratio IS NULL))
    );
    CREATE INDEX proof_tests_vessel_idx ON proof_tests (vessel_id, tested_on, created_at);

    CREATE TABLE vessel_events (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      vessel_id uuid NOT NULL REFERENCES vessels(id) ON DELETE RESTRICT,
      kind text NOT NULL CHECK (kind IN ('repair', 'modification', 'damage', 'crash', 'incident', 'heat_exposure',
        'quarantine', 'release', 'retire')),
      happened_on date NOT NULL,
      reason text NOT NULL CHECK (length(reason) BETWEEN 1 AND 1000),
      by_membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      new_layup_on date,
      created_at timestamptz NOT NULL DEFAULT now(),
      -- Only work on the laminate lays it up again.
      CHECK (new_layup_on IS NULL OR kind IN ('repair', 'modification'))
    );
    CREATE INDEX vessel_events_vessel_idx ON vessel_events (vessel_id, happened_on, created_at);
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TABLE IF EXISTS vessel_events;
    DROP TABLE IF EXISTS proof_tests;
    ALTER TABLE vessels DROP COLUMN IF EXISTS proof_requested_at;
    DROP TABLE IF EXISTS vessel_policies;
  `)
}
