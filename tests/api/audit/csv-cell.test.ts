import { describe, expect, it } from 'vitest'
import { sql } from '../../support/db'
import { csvCell } from '../../../shared/utils/csv'

// PostgreSQL's csv_cell (migration 0032) writes the desk's large exports; it must write every cell as
// the shared writer does. Formula characters: OWASP, "CSV Injection" (=, +, -, @, tab, carriage return).
const TEXTS = [
  'plain', 'North flat, east end', 'a "quoted" word', 'two\nlines', 'carriage\rreturn', 'crlf\r\nline',
  '=HYPERLINK("x")', '+1', '-3', '@SUM(A1)', '\tindented', '\rleading return', '=a,b', '-"q"',
  '3', '0042', 'T2 Laminate', 'SRG-1042', '', ' ', 'it\'s', 'naïve Ünïcode', '1+1', 'a=b', 'x-y', 'a@b',
] as const
const NUMBERS = [0, 7, -5, 120, -90, 2147483647] as const
const DECIMALS = [1.5, -2.25, 0.1, 40] as const

describe('csv_cell (PostgreSQL) and csvCell (TypeScript)', () => {
  it('write every text cell alike: quoting, doubled quotes, line breaks and defused formula starts', async () => {
    const rows = await sql<{ i: number, cell: string }>(
      'SELECT i::int, csv_cell(v) AS cell FROM unnest($1::text[]) WITH ORDINALITY AS x(v, i)', [TEXTS])
    expect(rows).toHaveLength(TEXTS.length)
    for (const row of rows) expect({ value: TEXTS[row.i - 1], cell: row.cell }).toEqual({ value: TEXTS[row.i - 1], cell: csvCell(TEXTS[row.i - 1]) })
  })

  it('write numbers as they are (a negative number stays a number) and an empty value as an empty cell', async () => {
    const rows = await sql<{ i: number, cell: string }>(
      'SELECT i::int, csv_cell(v) AS cell FROM unnest($1::int[]) WITH ORDINALITY AS x(v, i)', [NUMBERS])
    for (const row of rows) expect(row.cell).toBe(csvCell(NUMBERS[row.i - 1]))
    const decimals = await sql<{ i: number, cell: string }>(
      'SELECT i::int, csv_cell(v) AS cell FROM unnest($1::numeric[]) WITH ORDINALITY AS x(v, i)', [DECIMALS])
    for (const row of decimals) expect(row.cell).toBe(csvCell(DECIMALS[row.i - 1]))
    expect(csvCell(-5)).toBe('-5')
    const [empty] = await sql<{ text: string, number: string }>('SELECT csv_cell(NULL::text) AS text, csv_cell(NULL::int) AS number')
    expect(empty).toEqual({ text: csvCell(null), number: csvCell(null) })
    expect(empty!.text).toBe('')
  })
})
