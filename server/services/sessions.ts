import type { H3Event } from 'h3'
import { Membership, type User } from '../models'
import { normaliseRoles } from '../../shared/utils/permissions'
import type { SessionUser } from '../../shared/types/session'

/** The session user for `user`'s membership (their first club), or null when they have none. */
export async function sessionUserFor(user: User): Promise<SessionUser | null> {
  const membership = await Membership.findOne({ where: { userId: user.id }, order: [['createdAt', 'ASC']] })
  if (!membership) return null
  return {
    id: user.id,
    memberId: membership.id,
    name: user.name,
    email: user.email,
    clubId: membership.clubId,
    roles: normaliseRoles(membership.roles),
  }
}

/** Replaces the session with one for `user`. */
export async function startSession(event: H3Event, sessionUser: SessionUser): Promise<void> {
  await replaceUserSession(event, { user: sessionUser, loggedInAt: new Date().toISOString() })
}
