/**
 * THE CSV writer of every export: one header line, then one line per row, Windows line endings (what
 * spreadsheet programs write) unless asked for `\n` (the audit desk's, whose large tables PostgreSQL's
 * COPY writes with the same cell rules), a cell quoted only when it holds a quote, a comma or a line break.
 */

/** What a cell may hold: numbers stay numbers, an empty value is an empty cell. */
export type CsvValue = string | number | boolean | null | undefined

// OWASP's guidance on CSV injection: a text cell starting with one of these runs as a formula in a
// spreadsheet (or is read as one after a tab or carriage return), so it is prefixed with a single quote.
const FORMULA_START = /^[=+\-@\t\r]/

/**
 * One cell as CSV text. A number is written as it is (a negative number stays a number, not a
 * formula); text starting with `=`, `+`, `-`, `@`, a tab or a carriage return gets a leading `'`.
 */
export function csvCell(value: CsvValue): string {
  if (value === null || value === undefined) return ''
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : ''
  if (typeof value === 'boolean') return value ? 'yes' : 'no'
  const safe = FORMULA_START.test(value) ? `'${value}` : value
  return /[",\n\r]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe
}

/** A whole CSV document: the header, then each row, every line ending in `newline` (CRLF unless asked). */
export function toCsv(header: readonly string[], rows: readonly (readonly CsvValue[])[], newline: '\r\n' | '\n' = '\r\n'): string {
  return [header, ...rows].map(row => row.map(csvCell).join(',')).join(newline) + newline
}
