import type { H3Event } from 'h3'
import type { Paged } from '#shared/types/common'
import { toCsv, type CsvValue } from '#shared/utils/csv'

/** The most rows one export writes (a club's whole fill log fits many times over). */
export const EXPORT_MAX_ROWS = 200_000

/**
 * Sends `rows` under `header` as a CSV download named `filename` (the one way every export route
 * answers: the shared writer in `shared/utils/csv.ts` quotes and neutralises formulas).
 */
export function sendCsv(event: H3Event, filename: string, header: readonly string[], rows: readonly (readonly CsvValue[])[]): string {
  return sendCsvText(event, filename, toCsv(header, rows))
}

/** Sends a CSV document already written (by `toCsv`, or by PostgreSQL's `csv_cell`, its twin) as a download named `filename`. */
export function sendCsvText(event: H3Event, filename: string, text: string): string {
  setResponseHeader(event, 'content-type', 'text/csv; charset=utf-8')
  setResponseHeader(event, 'content-disposition', `attachment; filename="${filename.replace(/[^\w.-]/g, '-')}"`)
  setResponseHeader(event, 'cache-control', 'no-store')
  return text
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
