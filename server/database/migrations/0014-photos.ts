import type { MigrationFn } from '../migrator'

/**
 * Photos of vessels (build stages, the gauge at a proof test) and of coupon bursts. The image bytes
 * live outside the web root in the uploads folder, named by the photo's id; this row says whose it is
 * and what was stored (always a re-encoded JPEG, PNG or WebP, metadata stripped, with a thumbnail).
 * Proof tests and coupon tests point at their photo; a vessel's build photos point at the vessel.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE TABLE photos (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      vessel_id uuid REFERENCES vessels(id) ON DELETE RESTRICT,
      uploaded_by_membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      purpose text NOT NULL CHECK (purpose IN ('build', 'gauge', 'coupon')),
      content_type text NOT NULL CHECK (content_type IN ('image/jpeg', 'image/png', 'image/webp')),
      byte_size integer NOT NULL CHECK (byte_size > 0 AND byte_size <= 10485760),
      width integer NOT NULL CHECK (width > 0),
      height integer NOT NULL CHECK (height > 0),
      caption text CHECK (length(caption) <= 200),
      created_at timestamptz NOT NULL DEFAULT now(),
      -- Build and gauge photos belong to a vessel; a coupon's photo belongs to its coupon test.
      CHECK (purpose = 'coupon' OR vessel_id IS NOT NULL)
    );
    CREATE INDEX photos_vessel_idx ON photos (vessel_id, created_at);
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query('DROP TABLE IF EXISTS photos;')
}
