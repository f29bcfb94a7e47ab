import type { MigrationFn } from '../migrator'

/**
 * The vessel registry. Each club numbers its vessels from its own counter (`clubs.next_vessel_number`,
 * taken under the club row's lock by `takeVesselNumber`), so tags run SRG-0001, SRG-0002 … without
 * gaps from a race; the (club_id, tag) key backs that up. `retest due` is not stored: it is derived
 * from an in-service vessel's proof (interval, fill count), so no write is needed when it falls due.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    ALTER TABLE clubs ADD COLUMN next_vessel_number integer NOT NULL DEFAULT 1 CHECK (next_vessel_number >= 1);

    CREATE TABLE vessels (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      owner_membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      number integer NOT NULL CHECK (number >= 1),
      tag text NOT NULL CHECK (tag ~ '^[A-Z]{2,5}-[0-9]{4,}$'),
      name text NOT NULL CHECK (length(name) BETWEEN 1 AND 80),
      construction text NOT NULL
        CHECK (construction IN ('single_bottle', 'spliced_bottles', 'overwrapped_liner', 'mandrel_tube', 'other')),
      volume_l numeric(8, 3) NOT NULL CHECK (volume_l > 0 AND volume_l <= 100),
      diameter_mm numeric(7, 2) NOT NULL CHECK (diameter_mm > 0 AND diameter_mm <= 1000),
      length_mm numeric(7, 1) CHECK (length_mm > 0 AND length_mm <= 10000),
      empty_mass_g numeric(8, 1) CHECK (empty_mass_g > 0 AND empty_mass_g <= 100000),
      metal_in_pressure_path boolean NOT NULL DEFAULT false,
      fibre_class text CHECK (fibre_class IN ('e_glass', 's_glass', 'carbon', 'aramid', 'hybrid')),
      areal_weight_g_per_m2 numeric(7, 1) CHECK (areal_weight_g_per_m2 > 0 AND areal_weight_g_per_m2 <= 5000),
      weave text CHECK (weave IN ('woven_0_90', 'hoop_tow')),
      plies integer CHECK (plies BETWEEN 1 AND 50),
      resin text CHECK (length(resin) BETWEEN 1 AND 80),
      state text NOT NULL DEFAULT 'awaiting_proof'
        CHECK (state IN ('awaiting_proof', 'in_service', 'quarantined', 'failed', 'retired')),
      last_layup_on date,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      UNIQUE (club_id, number),
      UNIQUE (club_id, tag),
      -- A laminate is described whole or not at all: fibre, areal weight, weave and plies together.
      CHECK ((fibre_class IS NULL) = (areal_weight_g_per_m2 IS NULL)
        AND (fibre_class IS NULL) = (weave IS NULL)
        AND (fibre_class IS NULL) = (plies IS NULL)),
      CHECK (resin IS NULL OR fibre_class IS NOT NULL),
      -- Laid-up constructions carry a laminate; a layup date needs one.
      CHECK (construction NOT IN ('overwrapped_liner', 'mandrel_tube') OR fibre_class IS NOT NULL),
      CHECK (last_layup_on IS NULL OR fibre_class IS NOT NULL)
    );
    CREATE INDEX vessels_owner_idx ON vessels (owner_membership_id, created_at);
    CREATE INDEX vessels_club_state_idx ON vessels (club_id, state);
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TABLE IF EXISTS vessels;
    ALTER TABLE clubs DROP COLUMN IF EXISTS next_vessel_number;
  `)
}
