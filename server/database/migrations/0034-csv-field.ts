import type { MigrationFn } from '../migrator'
import { up as upCsvCell } from './0032-csv-cell'

/**
 * `csv_field(value)`: a value made ready for PostgreSQL's own CSV writer (`COPY … TO STDOUT (FORMAT
 * csv)`), so that the audit desk's large exports read back cell for cell as the shared `csvCell` in
 * `shared/utils/csv.ts` writes them. COPY quotes a field holding a quote, a comma or a line break and
 * doubles its quotes, as `csvCell` does; what it leaves to us: text starting with `=`, `+`, `-`, `@`,
 * a tab or a carriage return gets a leading `'` (OWASP's guidance on CSV injection); empty text
 * becomes NULL, which COPY writes as an empty cell (it would quote an empty string); a numeric NaN
 * becomes NULL too. Integers pass as they are. Each is one expression, so the planner inlines it.
 *
 * They replace migration 0032's `csv_cell`, which wrote whole lines for `string_agg`: COPY writes the
 * same cells for less work in the database and none in the server (decision 0052).
 * `tests/api/audit/csv-field.test.ts` checks them against `csvCell` value by value.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE FUNCTION csv_field(value text) RETURNS text LANGUAGE sql IMMUTABLE PARALLEL SAFE AS $$
      SELECT CASE WHEN value = '' THEN NULL WHEN value ~ '^[=+@\\t\\r-]' THEN '''' || value ELSE value END
    $$;
    CREATE FUNCTION csv_field(value integer) RETURNS integer LANGUAGE sql IMMUTABLE PARALLEL SAFE AS $$
      SELECT value
    $$;
    CREATE FUNCTION csv_field(value numeric) RETURNS numeric LANGUAGE sql IMMUTABLE PARALLEL SAFE AS $$
      SELECT CASE WHEN value = 'NaN' THEN NULL ELSE value END
    $$;
    DROP FUNCTION csv_cell(numeric);
    DROP FUNCTION csv_cell(integer);
    DROP FUNCTION csv_cell(text);
  `)
}

/** Back to migration 0032: its `csv_cell` functions made again, these dropped. */
export const down: MigrationFn = async (params) => {
  await upCsvCell(params)
  await params.context.query(`
    DROP FUNCTION IF EXISTS csv_field(numeric);
    DROP FUNCTION IF EXISTS csv_field(integer);
    DROP FUNCTION IF EXISTS csv_field(text);
  `)
}
