import type { MigrationFn } from '../migrator'

/**
 * The club's front door: the texts and section switches of the public page at `/`, one row per club
 * (a club without a row shows its name and the defaults). The limits live here as well as in the
 * schema, so no other writer can store a text the page was not laid out for. The club's name stays in
 * `clubs.name`; the front door edits it there (a length check is added for it, NOT VALID so a club
 * created earlier with a longer name still loads).
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE TABLE club_front_doors (
      club_id uuid PRIMARY KEY REFERENCES clubs(id) ON DELETE CASCADE,
      description text NOT NULL DEFAULT '' CHECK (length(description) <= 600),
      meets_where text NOT NULL DEFAULT '' CHECK (length(meets_where) <= 200),
      meets_when text NOT NULL DEFAULT '' CHECK (length(meets_when) <= 200),
      joining_note text NOT NULL DEFAULT '' CHECK (length(joining_note) <= 400),
      show_meetings boolean NOT NULL DEFAULT true,
      show_joining boolean NOT NULL DEFAULT true,
      show_dues boolean NOT NULL DEFAULT true,
      show_training boolean NOT NULL DEFAULT true,
      show_events boolean NOT NULL DEFAULT true,
      show_calculator boolean NOT NULL DEFAULT true,
      show_pass_check boolean NOT NULL DEFAULT true,
      updated_at timestamptz NOT NULL DEFAULT now()
    );
    ALTER TABLE clubs ADD CONSTRAINT clubs_name_length CHECK (length(btrim(name)) BETWEEN 1 AND 120) NOT VALID;
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TABLE IF EXISTS club_front_doors;
    ALTER TABLE clubs DROP CONSTRAINT IF EXISTS clubs_name_length;
  `)
}
