import type { H3Event } from 'h3'
import { Membership, type User } from '../models'
import { normaliseRoles } from '../../shared/utils/permissions'
import type { SessionUser } from '../../shared/types/session'

/** What a new session is made of: the user it shows and the account's session version it was issued at. */
export interface SessionStart {
  user: SessionUser
  /** `users.session_version` when the session began; a later password reset makes it stale. */
  sessionVersion: number
}

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
    sessionVersion: user.sessionVersion,
  }
}

/**
 * Replaces the session with a new one (sign-in, sign-up). The version goes into the sealed cookie's
 * server-only part, so `GET /api/_auth/session` shows just the user.
 */
export async function startSession(event: H3Event, start: SessionStart): Promise<void> {
  await replaceUserSession(event, {
    user: start.user,
    secure: { sessionVersion: start.sessionVersion },
    loggedInAt: new Date().toISOString(),
  })
}

/**
 * Shows `name` as the signed-in member's name from now on, keeping everything else of the session
 * (its version above all). Replaces rather than merges: merging would concatenate the roles array.
 */
export async function renameInSession(event: H3Event, name: string): Promise<void> {
  const { id: _sessionId, ...session } = await getUserSession(event)
  if (session.user) await replaceUserSession(event, { ...session, user: { ...session.user, name } })
}
