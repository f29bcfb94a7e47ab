import { QueryTypes, type ModelStatic, type Model, type Transaction } from 'sequelize'
import { Club, Membership, User } from '../../models'
import type { SessionRevokeReason } from '../../models/Session'
import { normaliseRoles } from '#shared/utils/permissions'
import { describeUserAgent } from '#shared/utils/user-agent'
import type { SessionUser } from '#shared/types/session'
import type { SessionDto } from '#shared/types/accounts'

/** What a new session shows: the member it signs in. */
export interface SessionStart {
  user: SessionUser
}

/** "Last seen" is written when older than this, so an ordinary request writes nothing. */
export const LAST_SEEN_EVERY_MS = 5 * 60_000

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i

/** The configured lifetimes in days: absolute (from sign-in) and idle (from the last request). */
export function sessionLimits(): { maxAgeDays: number, idleDays: number } {
  const config = useRuntimeConfig()
  const days = (value: unknown, fallback: number) => (Number(value) > 0 ? Number(value) : fallback)
  return { maxAgeDays: days(config.sessionMaxAgeDays, 30), idleDays: days(config.sessionIdleDays, 7) }
}

/** SQL condition for a session row `s` that has not ended; needs the replacements of `liveReplacements()`. */
const LIVE = `s.revoked_at IS NULL
  AND s.created_at > now() - :maxAgeDays * interval '1 day'
  AND s.last_seen_at > now() - :idleDays * interval '1 day'`

const liveReplacements = () => sessionLimits()

/** The session for `user`'s membership (their first club), or null when they have none. */
export async function sessionFor(user: User): Promise<SessionStart | null> {
  const membership = await Membership.findOne({ where: { userId: user.id }, order: [['createdAt', 'ASC']] })
  if (!membership) return null
  return {
    user: {
      id: user.id,
      memberId: membership.id,
      name: user.name,
      email: user.email,
      clubId: membership.clubId,
      roles: normaliseRoles(membership.roles),
    },
  }
}

/**
 * Opens a session row for `start` from `address` with browser `userAgent` and returns its id (the
 * sealed cookie's server-only part; utils/session-cookie.ts sets the cookie).
 */
export async function openSession(start: SessionStart, address: string, userAgent: string | null): Promise<string> {
  const [row] = await useDb().query<{ id: string }>(
    `INSERT INTO sessions (user_id, membership_id, address, user_agent) VALUES (:userId, :membershipId, :address, :userAgent) RETURNING id`,
    { replacements: { userId: start.user.id, membershipId: start.user.memberId, address: address.slice(0, 64), userAgent: userAgent?.slice(0, 512) ?? null }, type: QueryTypes.SELECT })
  return row!.id
}

/** A session that has not ended, with its member loaded as model instances (as a findOne would). */
export interface LiveSession {
  sessionId: string
  user: User
  membership: Membership
  club: Club
}

// "alias.column AS "alias.attribute"" for every attribute of `model`, so `nest: true` rebuilds its rows.
const columnCache = new Map<string, string>()
function columnsOf(model: ModelStatic<Model>, alias: string): string {
  const key = `${model.name}:${alias}`
  if (!columnCache.has(key)) {
    columnCache.set(key, Object.entries(model.rawAttributes)
      .map(([attribute, options]) => `${alias}.${options.field ?? attribute} AS "${alias}.${attribute}"`).join(', '))
  }
  return columnCache.get(key)!
}

type Attributes = Record<string, unknown>
type LiveRow = { s: { id: string, lastSeenAt: Date }, m: Attributes, u: Attributes, c: Attributes }

/**
 * The session `sessionId` with its membership, account and club, in ONE query that also checks the
 * session has not ended (not revoked, within the absolute lifetime and the idle timeout); null when
 * it has, or when `sessionId` is not a session id at all. "Last seen" is moved on only when older
 * than LAST_SEEN_EVERY_MS, so most requests write nothing.
 */
export async function loadLiveSession(sessionId: unknown): Promise<LiveSession | null> {
  if (typeof sessionId !== 'string' || !UUID.test(sessionId)) return null
  const db = useDb()
  const [row] = await db.query<LiveRow>(`
    SELECT s.id AS "s.id", s.last_seen_at AS "s.lastSeenAt",
      ${columnsOf(Membership, 'm')}, ${columnsOf(User, 'u')}, ${columnsOf(Club, 'c')}
    FROM sessions s
    JOIN memberships m ON m.id = s.membership_id AND m.user_id = s.user_id
    JOIN users u ON u.id = s.user_id
    JOIN clubs c ON c.id = m.club_id
    WHERE s.id = :sessionId AND ${LIVE}`,
  { replacements: { sessionId, ...liveReplacements() }, type: QueryTypes.SELECT, nest: true })
  if (!row) return null
  if (Date.now() - new Date(row.s.lastSeenAt).getTime() > LAST_SEEN_EVERY_MS) {
    // Conditional, so two requests at once write it once.
    await db.query(`UPDATE sessions SET last_seen_at = now() WHERE id = :sessionId AND last_seen_at < now() - :ms * interval '1 millisecond'`,
      { replacements: { sessionId, ms: LAST_SEEN_EVERY_MS } })
  }
  const built = { isNewRecord: false, raw: true }
  return {
    sessionId: row.s.id,
    membership: Membership.build(row.m, built),
    user: User.build(row.u, built),
    club: Club.build(row.c, built),
  }
}

/** Which live sessions to end: one by id (optionally only if it is `userId`'s), or all of an account or a membership. */
type Which = { sessionId: string, userId?: string } | { userId: string, exceptId?: string } | { membershipId: string }

/**
 * Ends the live sessions `which` names for `reason`, inside `transaction` when given, and logs one
 * line per account once committed. Returns how many ended (0 when none was live).
 */
export async function revokeSessions(which: Which, reason: SessionRevokeReason, address: string | null, transaction?: Transaction): Promise<number> {
  if ('sessionId' in which && !UUID.test(which.sessionId)) return 0
  const where = 'sessionId' in which
    ? `s.id = :sessionId${which.userId ? ' AND s.user_id = :userId' : ''}`
    : 'membershipId' in which
      ? 's.membership_id = :membershipId'
      : `s.user_id = :userId${which.exceptId ? ' AND s.id <> :exceptId' : ''}`
  const rows = await useDb().query<{ id: string, email: string }>(`
    UPDATE sessions s SET revoked_at = now(), revoke_reason = :reason
    FROM users u WHERE u.id = s.user_id AND ${where} AND ${LIVE}
    RETURNING s.id, u.email`,
  { replacements: { exceptId: null, userId: null, ...which, reason, ...liveReplacements() }, type: QueryTypes.SELECT, transaction })
  const log = () => {
    if (!rows.length) return
    const outcome = reason === 'signed_out' ? 'signed_out' : rows.length === 1 && 'sessionId' in which ? 'session_revoked' : 'sessions_revoked'
    logAuthEvent({ account: rows[0]!.email, address, outcome, reason, sessions: rows.length })
  }
  if (transaction) transaction.afterCommit(log)
  else log()
  return rows.length
}

/** The account's sessions that have not ended, most recently used first; `currentId` is marked as this device. */
export async function listSessions(userId: string, currentId: string | undefined): Promise<SessionDto[]> {
  const rows = await useDb().query<{ id: string, address: string, user_agent: string | null, created_at: Date, last_seen_at: Date }>(`
    SELECT s.id, s.address, s.user_agent, s.created_at, s.last_seen_at FROM sessions s
    WHERE s.user_id = :userId AND ${LIVE}
    ORDER BY s.last_seen_at DESC, s.created_at DESC`,
  { replacements: { userId, ...liveReplacements() }, type: QueryTypes.SELECT })
  return rows.map(r => ({
    id: r.id,
    device: describeUserAgent(r.user_agent),
    address: r.address,
    createdAt: new Date(r.created_at).toISOString(),
    lastSeenAt: new Date(r.last_seen_at).toISOString(),
    current: r.id === currentId,
  }))
}
