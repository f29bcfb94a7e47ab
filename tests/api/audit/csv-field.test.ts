import pg from 'pg'
import { to as copyTo } from 'pg-copy-streams'
import { describe, expect, it } from 'vitest'
import { testEnv } from '../../support/test-env'
import { csvCell, toCsv, type CsvValue } from '../../../shared/utils/csv'

// PostgreSQL's COPY … (FORMAT csv) over csv_field (migration 0034) writes the desk's large exports; it
// must write every cell as the shared writer does, byte for byte. Formula characters: OWASP, "CSV
// Injection" (=, +, -, @, tab, carriage return). Quoting: RFC 4180, section 2.
const TEXTS = [
  'plain', 'North flat, east end', 'a "quoted" word', 'two\nlines', 'carriage\rreturn', 'crlf\r\nline',
  '=HYPERLINK("x")', '+1', '-3', '@SUM(A1)', '\tindented', '\rleading return', '=a,b', '-"q"',
  '3', '0042', 'T2 Laminate', 'SRG-1042', '', ' ', 'it\'s', 'naïve Ünïcode', '1+1', 'a=b', 'x-y', 'a@b', 'back\\slash', null,
] as const
const NUMBERS = [0, 7, -5, 120, -90, 2147483647, null] as const
const DECIMALS = [1.5, -2.25, 0.1, 40, null] as const

/** What COPY writes for one column of `values` (an array literal of `type`) through csv_field, in order. */
async function copied(values: readonly (string | number | null)[], type: 'text' | 'int' | 'numeric'): Promise<string> {
  const client = new pg.Client({ connectionString: testEnv.databaseUrl })
  await client.connect()
  try {
    const literal = `ARRAY[${values.map(v => v === null ? 'NULL' : client.escapeLiteral(String(v))).join(', ')}]::${type}[]`
    const chunks: Buffer[] = []
    const stream = client.query(copyTo(`COPY (SELECT csv_field(v) FROM unnest(${literal}) WITH ORDINALITY AS x(v, i) ORDER BY i) TO STDOUT (FORMAT csv)`))
    for await (const chunk of stream) chunks.push(chunk as Buffer)
    return Buffer.concat(chunks).toString('utf8')
  }
  finally {
    await client.end()
  }
}

/** The same column as the shared writer writes it with `\n` line ends (no header). */
const written = (values: readonly CsvValue[]) => values.map(v => `${csvCell(v)}\n`).join('')

describe('COPY over csv_field (PostgreSQL) and csvCell (TypeScript)', () => {
  it('write every text cell alike, byte for byte: quoting, doubled quotes, line breaks, defused formula starts, empty cells', async () => {
    const document = await copied(TEXTS, 'text')
    expect(document).toBe(written(TEXTS))
    // Spot checks of what that equality covers.
    expect(document).toContain('\n"\'=HYPERLINK(""x"")"\n')
    expect(document).toContain('\n\'+1\n')
    expect(document).toContain('\n"\'=a,b"\n')
    expect(document).toContain('\n"a ""quoted"" word"\n')
  })

  it('write numbers as they are (a negative number stays a number) and an empty value as an empty cell', async () => {
    expect(await copied(NUMBERS, 'int')).toBe(written(NUMBERS))
    expect(await copied(DECIMALS, 'numeric')).toBe(written(DECIMALS))
    expect(csvCell(-5)).toBe('-5')
    expect(await copied(['NaN'], 'numeric')).toBe(written([Number.NaN]))
  })

  it('the shared writer gives the desk its line ending on request, and CRLF to every other export', () => {
    expect(toCsv(['a', 'b'], [['=x', 1]], '\n')).toBe('a,b\n\'=x,1\n')
    expect(toCsv(['a', 'b'], [['=x', 1]])).toBe('a,b\r\n\'=x,1\r\n')
  })
})
