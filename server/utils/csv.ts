import type { H3Event } from 'h3'
import type { Client } from 'pg'
import { to as copyTo } from 'pg-copy-streams'
import type { AbstractDialect } from 'sequelize/lib/dialects/abstract/index'
// CommonJS without named exports Node can see: the default import is its module.exports.
import sequelizeSql from 'sequelize/lib/utils/sql'
import type { Paged } from '#shared/types/common'
import { toCsv, type CsvValue } from '#shared/utils/csv'

/** The most rows one export writes (a club's whole fill log fits many times over). */
export const EXPORT_MAX_ROWS = 200_000

/**
 * Sends `rows` under `header` as a CSV download named `filename` (the one way every export route
 * answers: the shared writer in `shared/utils/csv.ts` quotes and neutralises formulas).
 */
export function sendCsv(event: H3Event, filename: string, header: readonly string[], rows: readonly (readonly CsvValue[])[]): Buffer {
  return sendCsvText(event, filename, toCsv(header, rows))
}

/**
 * Sends a CSV document already written (by `toCsv`, or by PostgreSQL's COPY through `copyCsv`) as a
 * download named `filename`. It goes out as UTF-8 bytes: Node writes a long string body to the socket
 * several times slower than the same bytes as a Buffer (about 1 ms against 0.1 ms for 200 KB on this
 * project's machines), and an export is the one long body the server sends.
 */
export function sendCsvText(event: H3Event, filename: string, text: string | Buffer): Buffer {
  setResponseHeader(event, 'content-type', 'text/csv; charset=utf-8')
  setResponseHeader(event, 'content-disposition', `attachment; filename="${filename.replace(/[^\w.-]/g, '-')}"`)
  setResponseHeader(event, 'cache-control', 'no-store')
  return typeof text === 'string' ? Buffer.from(text, 'utf8') : text
}

/**
 * The CSV lines PostgreSQL writes for `query` with `COPY (query) TO STDOUT (FORMAT csv)`, as bytes:
 * one line per row, `\n` after each, a field quoted when it holds a quote, a comma or a line break
 * (its quotes doubled), NULL an empty field. The query's columns go through `csv_field` (migration
 * 0034) to get the shared writer's other rules. Its `:name` replacements are inlined by the function
 * Sequelize applies to every query (COPY takes no bind parameters); it runs on a connection of the
 * app's pool. No row is parsed and no string built: the bytes go from the database to the response.
 */
export async function copyCsv(query: string, replacements: Record<string, unknown>): Promise<Buffer> {
  const db = useDb()
  const dialect = (db as unknown as { dialect: AbstractDialect }).dialect
  const statement = `COPY (${sequelizeSql.injectReplacements(query, dialect, replacements)}) TO STDOUT (FORMAT csv)`
  const connection = await db.connectionManager.getConnection({ type: 'read' }) as Client
  try {
    const chunks: Buffer[] = []
    for await (const chunk of connection.query(copyTo(statement))) chunks.push(chunk as Buffer)
    return Buffer.concat(chunks)
  }
  finally {
    await db.connectionManager.releaseConnection(connection as never)
  }
}

/**
 * Every row a paged list would show for its filters: the list's own service called page after page
 * (1 000 rows each) until the total is reached, so an export applies exactly the list's filters and order.
 */
export async function allPages<T>(list: (page: number, pageSize: number) => Promise<Paged<T>>): Promise<T[]> {
  const pageSize = 1000
  const items: T[] = []
  for (let page = 1; items.length < EXPORT_MAX_ROWS; page++) {
    const got = await list(page, pageSize)
    items.push(...got.items)
    if (got.items.length < pageSize || items.length >= got.total) break
  }
  return items
}
