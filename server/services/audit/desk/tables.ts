import { QueryTypes } from 'sequelize'
import type { Actor } from '../../../utils/auth'
import { containsPattern } from '../../../utils/like-pattern'
import type { DeskQuery } from '#shared/schemas/audit-desk'
import type { DeskCountDto, DeskCountsDto, DeskPageDto, DeskRowDto } from '#shared/types/audit-desk'
import { DESK_TABLES, DESK_TABLE_INFO, OFFICER_ONLY_COLUMNS, type DeskColumn, type DeskTable } from '#shared/utils/audit-desk'
import { toCsv } from '#shared/utils/csv'
import { deskContext, type DeskContext } from './context'
import { DESK_SOURCES, type DeskSourceRow } from './sources'

/** The columns of `table` the reader of `ctx` may see (no injury details for an admin). */
export function deskColumns(table: DeskTable, officer: boolean): DeskColumn[] {
  return DESK_TABLE_INFO[table].columns.filter(c => officer || !(OFFICER_ONLY_COLUMNS as readonly string[]).includes(c.key))
}

/** The context a query of `table` needs: with the vessel policy only when its source reads it. */
function tableContext(actor: Actor, table: DeskTable): Promise<DeskContext> {
  const source = DESK_SOURCES[table]
  return deskContext(actor, { policy: source.kind === 'sql' && source.policy === true })
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

/**
 * Where a row links, by its kind: the page's path before the row's `link_id` (a station links to the
 * stations page). A vessel's `link_id` is its tag, `^[A-Z]{2,5}-[0-9]{4,}$` by constraint, so it needs
 * no escaping in a path, written by TypeScript or by SQL.
 */
const LINK_PATHS: Record<DeskSourceRow['link_kind'], { path: string, withId: boolean }> = {
  member: { path: '/members/', withId: true }, vessel: { path: '/vessels/', withId: true },
  event: { path: '/events/', withId: true }, station: { path: '/fill-stations', withId: false },
}

/** A source row as the reader sees it: its link, and its cells (standings in words). */
function toRow(table: DeskTable, r: DeskSourceRow, columns: DeskColumn[]): DeskRowDto {
  const info = DESK_TABLE_INFO[table]
  const link = LINK_PATHS[r.link_kind]
  const cells = Object.fromEntries(columns.map(c => [c.key,
    c.key === 'state' || c.key === 'kind' ? (r.state === null ? null : info.states[r.state] ?? r.state) : r[c.key] ?? null]))
  return { id: r.id, link: { to: link.withId ? link.path + r.link_id : link.path, label: r.link_label }, cells }
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
 * The WHERE and ORDER BY of a SQL table's query, page or CSV, over its source aliased `t`: the
 * window, the standing and the search; the sort column (one of the table's keys, checked, so it may be
 * written into the statement), empty values last, then the id.
 */
function sqlSelection(ctx: DeskContext, q: { sort: string, dir: 'asc' | 'desc', until: string | null }, query: DeskQuery) {
  const where = ['true']
  if (q.until) where.push(`(t.due_on IS NULL OR t.due_on <= :${q.until})`)
  if (query.state !== undefined) where.push('t.state = :state')
  if (query.q) where.push(`lower(t.search) LIKE :pattern`)
  const column = q.sort === 'state' || q.sort === 'kind' ? 't.state' : `t."${q.sort}"`
  return {
    where: where.join(' AND '),
    order: `${column} ${q.dir === 'desc' ? 'DESC' : 'ASC'} NULLS LAST, t.id`,
    replacements: { ...ctx.replacements, state: query.state, pattern: query.q ? containsPattern(query.q) : null },
  }
}

/**
 * One page of desk table `table`, filtered, sorted and paged by the server: a SQL table in one query
 * (the count in a window function), a computed one from its source.
 */
export async function deskTablePage(actor: Actor, table: DeskTable, query: DeskQuery): Promise<DeskPageDto> {
  const ctx = await tableContext(actor, table)
  const q = checkedQuery(table, query)
  const columns = deskColumns(table, ctx.officer)
  const source = DESK_SOURCES[table]
  let total: number
  let rows: DeskSourceRow[]
  if (source.kind === 'computed') {
    ({ total, rows } = pageComputed(await source.rows(ctx), q, query, ctx, false))
  }
  else {
    const { where, order, replacements } = sqlSelection(ctx, q, query)
    const found = await useDb().query<DeskSourceRow & { total: number }>(
      `SELECT count(*) OVER ()::int AS total, t.* FROM (${source.sql(ctx)}) t WHERE ${where} ORDER BY ${order} LIMIT :limit OFFSET :offset`,
      { replacements: { ...replacements, limit: query.pageSize, offset: (query.page - 1) * query.pageSize }, type: QueryTypes.SELECT })
    total = found[0]?.total ?? 0
    rows = found
  }
  return { table, today: ctx.today, columns, items: rows.map(r => toRow(table, r, columns)), page: query.page, pageSize: query.pageSize, total }
}

/**
 * Desk table `table` as CSV: a header of column keys, then one line per row the filter selects, with
 * its link, in the page's order, each line ending in `\n`. A SQL table's lines are written by
 * PostgreSQL's COPY (`copyCsv`, with `csv_field` on every cell: migration 0034, tested against the
 * shared `csvCell`), so thousands of rows cost the server neither a parsed row nor a string; a
 * computed table's go through the shared writer with the same line ending.
 */
export async function deskTableCsv(actor: Actor, table: DeskTable, query: DeskQuery): Promise<Buffer> {
  const ctx = await tableContext(actor, table)
  const q = checkedQuery(table, query)
  const columns = deskColumns(table, ctx.officer)
  const header = [...columns.map(c => c.key), 'link']
  const source = DESK_SOURCES[table]
  if (source.kind === 'computed') {
    const { rows } = pageComputed(await source.rows(ctx), q, query, ctx, true)
    return Buffer.from(toCsv(header, rows.map(r => toRow(table, r, columns)).map(r => [...columns.map(c => r.cells[c.key] ?? null), r.link.to]), '\n'))
  }
  const { where, order, replacements } = sqlSelection(ctx, q, query)
  const cells = columns.map(c => c.key === 'state' || c.key === 'kind'
    ? 'csv_field(coalesce(CAST(:stateWords AS jsonb) ->> t.state, t.state))'
    : `csv_field(t."${c.key}")`)
  // A link is a path and an id or tag: nothing in it needs quoting or defusing.
  const link = `CASE t.link_kind ${Object.entries(LINK_PATHS).map(([kind, l]) =>
    `WHEN '${kind}' THEN '${l.path}'${l.withId ? ' || t.link_id' : ''}`).join(' ')} END`
  // OFFSET 0 keeps the source a subquery, so each of its columns is computed once per row: inlined,
  // csv_field would otherwise repeat a computed column's expression (a proof's standing) in each test.
  const lines = await copyCsv(
    `SELECT ${[...cells, link].join(', ')} FROM (SELECT * FROM (${source.sql(ctx)}) s OFFSET 0) t WHERE ${where} ORDER BY ${order}`,
    { ...replacements, stateWords: JSON.stringify(DESK_TABLE_INFO[table].states) })
  return Buffer.concat([Buffer.from(`${header.join(',')}\n`), lines])
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
  const ctx = await deskContext(actor, { policy: true })
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
