import type { MigrationFn } from '../migrator'

/**
 * `csv_cell(value)`: one CSV cell written by PostgreSQL, with exactly the rules of `csvCell` in
 * `shared/utils/csv.ts` (the writer of every export): an empty value is an empty cell; a number is
 * written as it is (an integer without a detour through numeric); text starting with `=`, `+`, `-`,
 * `@`, a tab or a carriage return gets a leading `'` (OWASP's guidance on CSV injection); a cell
 * holding a quote, a comma or a line break is quoted, its quotes doubled. Each is one expression (a
 * plain text cell costs one regular-expression test), so the planner inlines it into the query.
 *
 * The audit desk's large exports write their lines in one query with it, so the server neither
 * parses nor re-formats thousands of rows. `tests/api/audit/csv-cell.test.ts` checks it against
 * `csvCell` value by value.
 */
export const up: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    CREATE FUNCTION csv_cell(value text) RETURNS text LANGUAGE sql IMMUTABLE PARALLEL SAFE AS $$
      SELECT CASE WHEN value !~ '^[=+@\\t\\r-]|[",\\n\\r]' THEN value
                  WHEN value IS NULL THEN ''
                  WHEN value ~ '[",\\n\\r]' THEN '"' || replace(CASE WHEN value ~ '^[=+@\\t\\r-]' THEN '''' || value ELSE value END, '"', '""') || '"'
                  ELSE '''' || value END
    $$;
    CREATE FUNCTION csv_cell(value integer) RETURNS text LANGUAGE sql IMMUTABLE PARALLEL SAFE AS $$
      SELECT CASE WHEN value IS NULL THEN '' ELSE value::text END
    $$;
    CREATE FUNCTION csv_cell(value numeric) RETURNS text LANGUAGE sql IMMUTABLE PARALLEL SAFE AS $$
      SELECT CASE WHEN value IS NULL OR value = 'NaN' THEN '' ELSE value::text END
    $$;
  `)
}

export const down: MigrationFn = async ({ context: sequelize }) => {
  await sequelize.query(`
    DROP FUNCTION IF EXISTS csv_cell(numeric);
    DROP FUNCTION IF EXISTS csv_cell(integer);
    DROP FUNCTION IF EXISTS csv_cell(text);
  `)
}
