import { createReadStream } from 'node:fs'
import { open } from 'node:fs/promises'
import Papa from 'papaparse'
import { IMPORT_MAX_COLUMNS } from '#shared/schemas/club-data'

/** How a roster file is written, judged from its first bytes. */
export interface CsvShape {
  /** 3 when the file starts with the UTF-8 byte-order mark (skipped), else 0. */
  bomBytes: number
  delimiter: ',' | ';'
  newline: '\r\n' | '\n' | '\r'
}

const HEAD_BYTES = 64 * 1024

/**
 * The shape of the CSV file at `path` from its first 64 KB: a byte-order mark, the separator (the one
 * of comma and semicolon that occurs more often outside quotes in the first line — a spreadsheet in a
 * language that writes decimal commas exports semicolons) and the line ending (Windows or Unix).
 */
export async function csvShape(path: string): Promise<CsvShape> {
  const file = await open(path, 'r')
  try {
    const buffer = Buffer.alloc(HEAD_BYTES)
    const { bytesRead } = await file.read(buffer, 0, HEAD_BYTES, 0)
    const head = buffer.subarray(0, bytesRead)
    const bomBytes = head[0] === 0xEF && head[1] === 0xBB && head[2] === 0xBF ? 3 : 0
    const text = head.subarray(bomBytes).toString('utf8')
    let commas = 0, semicolons = 0, quoted = false, newline: CsvShape['newline'] = '\n'
    for (let i = 0; i < text.length; i++) {
      const c = text[i]
      if (c === '"') quoted = !quoted
      else if (quoted) continue
      else if (c === ',') commas++
      else if (c === ';') semicolons++
      else if (c === '\r' || c === '\n') {
        newline = c === '\r' ? (text[i + 1] === '\n' ? '\r\n' : '\r') : '\n'
        break
      }
    }
    return { bomBytes, delimiter: semicolons > commas ? ';' : ',', newline }
  }
  finally {
    await file.close()
  }
}

// A cell the refused-rows download neutralised against spreadsheet formulas ('=1+2) reads as written.
const NEUTRALISED = /^'(?=[=+\-@\t\r])/

/**
 * The rows of the CSV file at `path`, one array of cells at a time, streamed through papaparse with
 * back-pressure: a 50 000-row file never sits in memory. Quoted fields may hold separators, quotes
 * and line breaks; blank lines are skipped; a row wider than IMPORT_MAX_COLUMNS is cut there.
 */
export async function* csvRows(path: string, shape?: CsvShape): AsyncGenerator<string[]> {
  const { bomBytes, delimiter, newline } = shape ?? await csvShape(path)
  const parser = Papa.parse(Papa.NODE_STREAM_INPUT, { delimiter, newline, skipEmptyLines: 'greedy' })
  // A text stream decodes UTF-8 across chunk edges; the byte-order mark is skipped, never read.
  const source = createReadStream(path, { encoding: 'utf8', start: bomBytes })
  source.on('error', error => parser.destroy(error))
  source.pipe(parser)
  try {
    for await (const row of parser as AsyncIterable<string[]>) {
      yield row.slice(0, IMPORT_MAX_COLUMNS).map(cell => cell.replace(NEUTRALISED, ''))
    }
  }
  finally {
    source.destroy()
    parser.destroy()
  }
}

/** The headings and the first `previewRows` data rows of the file at `path` (reads no further). */
export async function csvHead(path: string, previewRows: number): Promise<{ shape: CsvShape, headings: string[], preview: string[][] }> {
  const shape = await csvShape(path)
  let headings: string[] | null = null
  const preview: string[][] = []
  for await (const row of csvRows(path, shape)) {
    if (!headings) headings = row
    else preview.push(row)
    if (preview.length >= previewRows) break
  }
  return { shape, headings: headings ?? [], preview }
}

/**
 * Rows as CSV text (comma-separated, quoted where needed, Windows line endings), text cells that a
 * spreadsheet would run as a formula (=, +, -, @, tab, carriage return first) prefixed with a quote.
 */
export function toCsv(rows: readonly (readonly string[])[]): string {
  return Papa.unparse(rows as string[][], { escapeFormulae: true, newline: '\r\n' }) + '\r\n'
}
