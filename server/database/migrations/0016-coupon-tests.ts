import type { MigrationFn } from '../migrator'

/**
 * Coupon tests: short tubes laid up like a vessel and burst on purpose, to calibrate the burst
 * estimate of their layup family (fibre class + areal weight + weave + resin). The member who records
 * a coupon did the test or witnessed it. `resin_key` is the resin as families compare it (trimmed,
 * spaces collapsed, lower-cased), written by the service from the one function that makes family keys,
 * so SQL and pages group alike. A hybrid of fibres has no single strength and is not a coupon layup.
 * A coupon's photo must be one of its own club's (the (id, club_id) key below); its purpose is checked
 * by the service.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE photos ADD CONSTRAINT photos_id_club_key UNIQUE (id, club_id);

    CREATE TABLE coupon_tests (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      tested_by_membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      tested_on date NOT NULL,
      fibre_class text NOT NULL CHECK (fibre_class IN ('e_glass', 's_glass', 'carbon', 'aramid')),
      areal_weight_g_per_m2 numeric(7, 1) NOT NULL CHECK (areal_weight_g_per_m2 > 0 AND areal_weight_g_per_m2 <= 5000),
      weave text NOT NULL CHECK (weave IN ('woven_0_90', 'hoop_tow')),
      plies integer NOT NULL CHECK (plies BETWEEN 1 AND 50),
      resin text NOT NULL CHECK (length(resin) BETWEEN 1 AND 80),
      resin_key text NOT NULL CHECK (length(resin_key) BETWEEN 1 AND 80 AND resin_key = lower(resin_key)),
      tube_diameter_mm numeric(7, 2) NOT NULL CHECK (tube_diameter_mm > 0 AND tube_diameter_mm <= 1000),
      fibre_volume_fraction numeric(4, 3) NOT NULL DEFAULT 0.35 CHECK (fibre_volume_fraction >= 0.1 AND fibre_volume_fraction <= 0.8),
      burst_pressure_bar numeric(8, 2) NOT NULL CHECK (burst_pressure_bar > 0 AND burst_pressure_bar <= 2000),
      failure_mode text NOT NULL
        CHECK (failure_mode IN ('hoop_rupture', 'axial_split', 'end_fitting', 'leak_before_burst', 'other')),
      notes text CHECK (length(notes) <= 2000),
      photo_id uuid UNIQUE,
      created_at timestamptz NOT NULL DEFAULT now(),
      FOREIGN KEY (photo_id, club_id) REFERENCES photos (id, club_id) ON DELETE RESTRICT
    );
    -- A family's coupons, and a vessel's family, are found by these four.
    CREATE INDEX coupon_tests_family_idx ON coupon_tests (club_id, fibre_class, areal_weight_g_per_m2, weave, resin_key);
    CREATE INDEX coupon_tests_club_tested_idx ON coupon_tests (club_id, tested_on DESC, created_at DESC);
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TABLE IF EXISTS coupon_tests;
    ALTER TABLE photos DROP CONSTRAINT IF EXISTS photos_id_club_key;
  `)
}
