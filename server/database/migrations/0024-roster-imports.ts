import type { MigrationFn } from '../migrator'

/**
 * Roster imports (the club-data domain).
 *
 * - `import_jobs`: one uploaded roster file and what became of it — the mapping and date format the
 *   admin chose, the dry run's counts, and the run's progress. The job's state lives here, not in a
 *   server's memory: a server claims a queued or abandoned job with a fresh `claim_id` and a lease
 *   (`locked_until`) that it renews while it works, so another server carries the job on when the
 *   first one stops. The file itself is kept privately in the uploads folder as `import-<id>.csv`.
 * - `import_rows`: the staging rows of a job, one per data row of the file: the cells as written (for
 *   the refused rows' download), what the dry run found, and the checked values the run writes. The
 *   run marks each row done in the same transaction as its writes, so a taken-over job never writes a
 *   row twice. The file and the staging rows are deleted when the job ends.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE TABLE import_jobs (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      club_id uuid NOT NULL REFERENCES clubs(id) ON DELETE RESTRICT,
      created_by_membership_id uuid NOT NULL REFERENCES memberships(id) ON DELETE RESTRICT,
      status text NOT NULL DEFAULT 'uploaded'
        CHECK (status IN ('uploaded', 'checked', 'queued', 'running', 'done', 'failed', 'cancelled')),
      file_bytes bigint NOT NULL CHECK (file_bytes >= 0),
      delimiter text NOT NULL CHECK (delimiter IN (',', ';')),
      headings jsonb NOT NULL,
      preview jsonb NOT NULL,
      mapping jsonb,
      total_rows integer NOT NULL DEFAULT 0 CHECK (total_rows >= 0),
      dry_create integer NOT NULL DEFAULT 0,
      dry_update integer NOT NULL DEFAULT 0,
      dry_unchanged integer NOT NULL DEFAULT 0,
      dry_refused integer NOT NULL DEFAULT 0,
      rows_done integer NOT NULL DEFAULT 0 CHECK (rows_done >= 0),
      created_count integer NOT NULL DEFAULT 0,
      updated_count integer NOT NULL DEFAULT 0,
      unchanged_count integer NOT NULL DEFAULT 0,
      refused_count integer NOT NULL DEFAULT 0,
      claim_id uuid,
      locked_until timestamptz,
      started_at timestamptz,
      finished_at timestamptz,
      last_error text CHECK (length(last_error) <= 2000),
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      CHECK (rows_done <= total_rows),
      CHECK ((status IN ('done', 'failed', 'cancelled')) = (finished_at IS NOT NULL))
    );
    CREATE INDEX import_jobs_club_created ON import_jobs (club_id, created_at DESC);
    CREATE INDEX import_jobs_runnable ON import_jobs (locked_until) WHERE status IN ('queued', 'running');

    CREATE TABLE import_rows (
      job_id uuid NOT NULL REFERENCES import_jobs(id) ON DELETE CASCADE,
      line integer NOT NULL CHECK (line >= 2),
      cells jsonb NOT NULL,
      email text,
      outcome text NOT NULL CHECK (outcome IN ('create', 'update', 'unchanged', 'refused')),
      issues jsonb NOT NULL DEFAULT '[]',
      row_values jsonb,
      done boolean NOT NULL DEFAULT false,
      PRIMARY KEY (job_id, line),
      CHECK ((outcome = 'refused') = (row_values IS NULL))
    );
    CREATE INDEX import_rows_pending ON import_rows (job_id, line) WHERE NOT done;
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP TABLE IF EXISTS import_rows;
    DROP TABLE IF EXISTS import_jobs;
  `)
}
