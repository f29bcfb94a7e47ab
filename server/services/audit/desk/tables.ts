import { QueryTypes } from 'sequelize'
import type { Actor } from '../../../utils/auth'
import { containsPattern } from '../../../utils/like-pattern'
import type { DeskQuery } from '#shared/schemas/audit-desk'
import type { DeskCountDto, DeskCountsDto, DeskPageDto, DeskRowDto } from '#shared/types/audit-desk'
import { DESK_TABLES, DESK_TABLE_INFO, OFFICER_ONLY_COLUMNS, deskCsvCell, type DeskColumn, type DeskTable } from '#shared/utils/audit-desk'
import { deskContext, type DeskContext } from './context'
import { DESK_SOURCES, type DeskSourceRow } from './sources'

/** The columns of `table` the reader of `ctx` may see (no injury details for an admin). */
export function deskColumns(table: DeskTable, officer: boolean): DeskColumn[] {
  return DESK_TABLE_INFO[table].columns.filter(c => officer || !(OFFICER_ONLY_COLUMNS as readonly string[]).includes(c.key))
}

/** The sort, state and window a query asks of `table`, checked: 400 for a column or standing the table has not. */
function checkedQuery(table: DeskTable, query: DeskQuery) {
  const info = DESK_TABLE_INFO[table]
  const sort = query.sort ?? info.defaultSort
  if (!info.columns.some(c => c.key === sort && c.sortable)) {
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: `sort: The table does not sort by ${sort}`, data: { fields: { sort: 'Not a column this table sorts by' } } })
  }
  if (query.state !== undefined && !(query.state in info.states)) {
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'state: Not a standing of this table', data: { fields: { state: 'Not a standing of this table' } } })
  }
  return { sort, dir: query.dir ?? info.defaultDir, until: info.windowed ? `d${query.within}` : null }
}

/** A source row as the reader sees it: its link, and its cells (standings in words). */
function toRow(table: DeskTable, r: DeskSourceRow, columns: DeskColumn[]): DeskRowDto {
  const info = DESK_TABLE_INFO[table]
  const LINKS: Record<DeskSourceRow['link_kind'], string> = {
    member: `/members/${r.link_id}`, vessel: `/vessels/${encodeURIComponent(r.link_id)}`, event: `/events/${r.link_id}`, station: '/fill-stations',
  }
  const to = LINKS[r.link_kind]
  const cells = Object.fromEntries(columns.map(c => [c.key,
    c.key === 'state' || c.key === 'kind' ? (r.state === null ? null : info.states[r.state] ?? r.state) : r[c.key] ?? null]))
  return { id: r.id, link: { to, label: r.link_label }, cells }
}

/** Filter, sort and page rows a computed source gave (the same rules as the SQL wrapper). */
function pageComputed(rows: DeskSourceRow[], q: { sort: string, dir: 'asc' | 'desc', until: string | null }, query: DeskQuery, ctx: DeskContext, all: boolean) {
  const until = q.until ? ctx.replacements[q.until] as string : null
  const needle = query.q?.toLowerCase()
  const kept = rows.filter(r => (until === null || r.due_on === null || r.due_on <= until)
    && (query.state === undefined || r.state === query.state)
    && (!needle || r.search.toLowerCase().includes(needle)))
  const key = q.sort === 'state' || q.sort === 'kind' ? 'state' : q.sort
  const sign = q.dir === 'desc' ? -1 : 1
  kept.sort((a, b) => {
    const x = a[key] ?? null
    const y = b[key] ?? null
    // Empty values last, whichever the direction (as PostgreSQL's NULLS LAST below).
    if (x === y) return a.id < b.id ? -1 : a.id > b.id ? 1 : 0
    if (x === null) return 1
    if (y === null) return -1
    return (x < y ? -1 : 1) * sign
  })
  return { total: kept.length, rows: all ? kept : kept.slice((query.page - 1) * query.pageSize, query.page * query.pageSize) }
}

/**
 * One page of desk table `table` (every row with `all`, for the CSV), filtered, sorted and paged by the
 * server: a SQL table in one query (the count in a window function), a computed one from its source.
 */
export async function deskTablePage(actor: Actor, table: DeskTable, query: DeskQuery, opts: { all?: boolean } = {}): Promise<DeskPageDto> {
  const ctx = await deskContext(actor)
  const q = checkedQuery(table, query)
  const columns = deskColumns(table, ctx.officer)
  const source = DESK_SOURCES[table]
  let total: number
  let rows: DeskSourceRow[]
  if (source.kind === 'computed') {
    ({ total, rows } = pageComputed(await source.rows(ctx), q, query, ctx, !!opts.all))
  }
  else {
    const where = ['true']
    if (q.until) where.push(`(t.due_on IS NULL OR t.due_on <= :${q.until})`)
    if (query.state !== undefined) where.push('t.state = :state')
    if (query.q) where.push(`lower(t.search) LIKE :pattern`)
    // `sort` is one of the table's column keys (checked above), so it may be written into the statement.
    const order = q.sort === 'state' || q.sort === 'kind' ? 't.state' : `t."${q.sort}"`
    const found = await useDb().query<DeskSourceRow & { total: number }>(
      `SELECT ${opts.all ? '' : 'count(*) OVER ()::int AS total,'} t.* FROM (${source.sql(ctx)}) t WHERE ${where.join(' AND ')}
        ORDER BY ${order} ${q.dir === 'desc' ? 'DESC' : 'ASC'} NULLS LAST, t.id ${opts.all ? '' : 'LIMIT :limit OFFSET :offset'}`,
      { replacements: { ...ctx.replacements, state: query.state, pattern: query.q ? containsPattern(query.q) : null, limit: query.pageSize, offset: (query.page - 1) * query.pageSize }, type: QueryTypes.SELECT })
    // Every row (the CSV) needs no window count: the total is the rows themselves.
    total = opts.all ? found.length : found[0]?.total ?? 0
    rows = found
  }
  return { table, today: ctx.today, columns, items: rows.map(r => toRow(table, r, columns)), page: query.page, pageSize: query.pageSize, total }
}

/** Desk table `table` as CSV: a header of column keys, then one line per row the filter selects, with its link. */
export async function deskTableCsv(actor: Actor, table: DeskTable, query: DeskQuery): Promise<string> {
  const page = await deskTablePage(actor, table, query, { all: true })
  const header = [...page.columns.map(c => c.key), 'link']
  const lines = page.items.map(r => [...page.columns.map(c => r.cells[c.key] ?? null), r.link.to].map(deskCsvCell).join(','))
  return [header.join(','), ...lines].join('\r\n') + '\r\n'
}

/** The count of a computed table, from its rows. */
async function countComputed(ctx: DeskContext, table: DeskTable, rows: (ctx: DeskContext) => Promise<DeskSourceRow[]>): Promise<DeskCountDto> {
  const all = await rows(ctx)
  const within = (d: string) => all.filter(r => r.due_on === null || r.due_on <= d).length
  return {
    table, total: all.length, extra: {},
    within: DESK_TABLE_INFO[table].windowed ? { 30: within(ctx.replacements.d30 as string), 60: within(ctx.replacements.d60 as string), 90: all.length } : null,
  }
}

/**
 * The counts of the SQL tables in one statement: one aggregate per table (its own SELECT, as the
 * table's page runs it), joined by UNION ALL, so the desk pays one round trip for all of them.
 */
async function countSqlTables(ctx: DeskContext, tables: DeskTable[]): Promise<DeskCountDto[]> {
  if (!tables.length) return []
  const parts = tables.map((table, i) => {
    const source = DESK_SOURCES[table]
    if (source.kind !== 'sql') throw new Error(`${table} is not a SQL table`)
    const extras = table === 'event-fills'
      ? 'coalesce(sum(t."refused"), 0)::int AS refused, coalesce(sum(t."supervised"), 0)::int AS supervised'
      : 'NULL::int AS refused, NULL::int AS supervised'
    return `SELECT ${i} AS n, count(*)::int AS total,
            count(*) FILTER (WHERE t.due_on IS NULL OR t.due_on <= :d30)::int AS w30,
            count(*) FILTER (WHERE t.due_on IS NULL OR t.due_on <= :d60)::int AS w60, ${extras}
       FROM (${source.sql(ctx)}) t`
  })
  const rows = await useDb().query<{ n: number, total: number, w30: number, w60: number, refused: number | null, supervised: number | null }>(
    parts.join('\n UNION ALL\n'), { replacements: ctx.replacements, type: QueryTypes.SELECT })
  const byTable = new Map(rows.map(r => [tables[r.n]!, r]))
  return tables.map((table) => {
    const row = byTable.get(table)
    const extra: Record<string, number> = {}
    if (row?.refused != null) extra.refused = row.refused
    if (row?.supervised != null) extra.supervised = row.supervised
    return { table, total: row?.total ?? 0, within: DESK_TABLE_INFO[table].windowed ? { 30: row?.w30 ?? 0, 60: row?.w60 ?? 0, 90: row?.total ?? 0 } : null, extra }
  })
}

/** The desk's counts: the SQL tables in one statement (one aggregate each), the computed ones from their rows. */
export async function deskCounts(actor: Actor): Promise<DeskCountsDto> {
  const ctx = await deskContext(actor)
  const sqlTables = DESK_TABLES.filter(t => DESK_SOURCES[t].kind === 'sql')
  const [counted, computed] = await Promise.all([
    countSqlTables(ctx, sqlTables),
    Promise.all(DESK_TABLES.flatMap((t) => {
      const source = DESK_SOURCES[t]
      return source.kind === 'computed' ? [countComputed(ctx, t, source.rows)] : []
    })),
  ])
  const all = new Map([...counted, ...computed].map(c => [c.table, c]))
  return { today: ctx.today, counts: DESK_TABLES.map(t => all.get(t)!) }
}
