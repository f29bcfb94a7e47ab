import { containsPattern } from '../../utils/like-pattern'
import { QueryTypes } from 'sequelize'
import type { Club } from '../../models'
import type { MemberDirectoryQuery } from '#shared/schemas/member'
import type { MemberListItemDto } from '#shared/types/members'
import type { Paged } from '#shared/types/common'
import { clubToday } from '../clubs'
import { toMemberListItem } from './members'
import { statusPredicates } from './status-sql'

// The status filter: the one SQL copy of the status function, with this file's bind parameters.
const STATUS_SQL = statusPredicates({ today: '$today', graceDays: '$graceDays' })

/** ORDER BY for each sort field; the membership id breaks ties so pages never overlap or skip. */
const ORDER_SQL: Record<MemberDirectoryQuery['sort'], (dir: 'ASC' | 'DESC') => string> = {
  // The account's name and e-mail, copied lower-cased onto the membership by triggers (migration
  // 0011), so the (club_id, key, id) indexes serve any page without joining users.
  name: dir => `m.name_key ${dir}, m.id ${dir}`,
  email: dir => `m.email_key ${dir}, m.id ${dir}`,
  // Never-paid members (no date) come last whichever way the dates run.
  paidThrough: dir => `m.paid_through ${dir} NULLS LAST, m.id ${dir}`,
  joined: dir => `m.created_at ${dir}, m.id ${dir}`,
}

interface DirectoryRow {
  id: string
  roles: string[]
  approved_at: Date | null
  paid_through: string | null
  suspended_at: Date | null
  resigned_at: Date | null
  birth_date: string | null
  created_at: Date
  name: string
  email: string
}

/** The two statements behind one directory page, with their named bind parameters (`$name`). */
export interface DirectoryStatements {
  countSql: string
  pageSql: string
  bind: Record<string, unknown>
}

/**
 * Builds the COUNT and page statements for a directory query (pure: no database needed, so the
 * benchmark can EXPLAIN exactly what the route runs). "Today" is taken in the club's time zone.
 */
export function directoryStatements(
  club: Pick<Club, 'id' | 'timeZone' | 'graceDays'>,
  query: MemberDirectoryQuery,
  now = new Date(),
): DirectoryStatements {
  const bind: Record<string, unknown> = { clubId: club.id }
  const where = ['m.club_id = $clubId']
  if (query.status) {
    where.push(`(${STATUS_SQL[query.status]})`)
    bind.today = clubToday(club, now)
    bind.graceDays = club.graceDays
  }
  if (query.role) {
    where.push('m.roles @> ARRAY[CAST($role AS text)]')
    bind.role = query.role
  }
  const q = query.q?.split('\u0000').join('').trim()
  if (q) {
    // Both sides are served by the trigram GIN indexes on lower(name) and lower(email).
    where.push('(lower(u.name) LIKE $pattern OR lower(u.email) LIKE $pattern)')
    bind.pattern = containsPattern(q)
  }
  const conditions = where.join(' AND ')
  const order = ORDER_SQL[query.sort](query.dir === 'desc' ? 'DESC' : 'ASC')
  // Users are joined only when the search needs their name or e-mail.
  const users = q ? 'JOIN users u ON u.id = m.user_id' : ''
  return {
    countSql: `SELECT count(*)::int AS total FROM memberships m ${users} WHERE ${conditions}`,
    // A deferred join: the page's ids are found first on narrow rows (index order where one fits),
    // then only those 25 rows are widened; deep pages sort half as much data this way.
    pageSql: `SELECT m.id, m.roles, m.approved_at, m.paid_through::text AS paid_through, m.suspended_at, m.resigned_at,
        m.birth_date::text AS birth_date, m.created_at, u.name, u.email
      FROM (SELECT m.id FROM memberships m ${users} WHERE ${conditions} ORDER BY ${order} LIMIT $limit OFFSET $offset) page
      JOIN memberships m ON m.id = page.id
      JOIN users u ON u.id = m.user_id
      ORDER BY ${order}`,
    bind: { ...bind, limit: query.pageSize, offset: (query.page - 1) * query.pageSize },
  }
}

/**
 * One page of club `club`'s member directory: filtered by status, role and a case-insensitive
 * substring of name or e-mail, sorted, paged. Two queries — a COUNT and the page — and never the
 * whole table; the status filter uses STATUS_SQL with "today" in the club's time zone.
 */
export async function listMembers(
  club: Pick<Club, 'id' | 'timeZone' | 'graceDays'>,
  query: MemberDirectoryQuery,
  now = new Date(),
): Promise<Paged<MemberListItemDto>> {
  const { countSql, pageSql, bind } = directoryStatements(club, query, now)
  const { limit: _limit, offset, ...countBind } = bind
  const db = useDb()
  const [counted] = await db.query<{ total: number }>(countSql, { bind: countBind, type: QueryTypes.SELECT })
  const total = counted?.total ?? 0
  const rows = Number(offset) >= total ? [] : await db.query<DirectoryRow>(pageSql, { bind, type: QueryTypes.SELECT })
  return {
    items: rows.map(r => toMemberListItem({
      id: r.id,
      roles: r.roles as MemberListItemDto['roles'],
      approvedAt: r.approved_at,
      paidThrough: r.paid_through,
      suspendedAt: r.suspended_at,
      resignedAt: r.resigned_at,
      birthDate: r.birth_date,
      createdAt: r.created_at,
      user: { name: r.name, email: r.email },
    }, club, now)),
    page: query.page,
    pageSize: query.pageSize,
    total,
  }
}
