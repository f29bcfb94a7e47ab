import type { H3Event } from 'h3'
import { Club, Membership, User } from '../models'
import { rolesCan, normaliseRoles, type Capability, type Role } from '../../shared/utils/permissions'
import { membershipStatus, statusKeepsRights, type MembershipStatus } from '../../shared/utils/membership-status'

export interface Actor {
  user: User
  membership: Membership
  club: Club
  roles: Role[]
  status: MembershipStatus
}

/**
 * The signed-in member, read fresh from the database on every request: roles and status come from
 * the membership row, never from the cookie alone, so a removed role or a suspension bites at once.
 * 401 (and the cookie cleared) when not signed in, when the membership is gone, or when the
 * session began before the account's password was last reset.
 */
export async function requireMember(event: H3Event): Promise<Actor> {
  if (event.context.actor) return event.context.actor as Actor
  const session = await requireUserSession(event)
  useDb()
  const membership = await Membership.findOne({
    where: { id: session.user.memberId, userId: session.user.id },
    include: [{ model: User, as: 'user' }, { model: Club, as: 'club' }],
  })
  // A session older than the account's last password reset is revoked (a cookie without a version counts as 0).
  const revoked = (session.secure?.sessionVersion ?? 0) < (membership?.user?.sessionVersion ?? 0)
  if (!membership?.user || !membership.club || revoked) {
    await clearUserSession(event)
    throw createError({ statusCode: 401, statusMessage: 'Unauthorized', message: 'Please sign in again' })
  }
  const status = membershipStatus(membership, { timeZone: membership.club.timeZone, graceDays: membership.club.graceDays })
  const actor: Actor = { user: membership.user, membership, club: membership.club, roles: normaliseRoles(membership.roles), status }
  event.context.actor = actor
  return actor
}

/** Whether `actor` holds `capability` now: by role, and only while not suspended or resigned. */
export function actorCan(actor: Actor, capability: Capability): boolean {
  return statusKeepsRights(actor.status) && rolesCan(actor.roles, capability)
}

/** 401 unless signed in; 403 unless the member holds `capability` (see shared/utils/permissions.ts). */
export async function requirePermission(event: H3Event, capability: Capability): Promise<Actor> {
  const actor = await requireMember(event)
  if (!actorCan(actor, capability)) {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: `You do not have the right to do this (${capability})` })
  }
  return actor
}
