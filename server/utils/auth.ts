import type { H3Event } from 'h3'
import type { Club, Membership, User } from '../models'
import { loadLiveSession } from '../services/accounts'
import { rolesCan, normaliseRoles, type Capability, type Role } from '#shared/utils/permissions'
import { membershipStatus, statusKeepsRights, type MembershipStatus } from '#shared/utils/membership-status'

export interface Actor {
  user: User
  membership: Membership
  club: Club
  roles: Role[]
  status: MembershipStatus
  /** The session this request came with (absent for an actor made up outside a request). */
  sessionId?: string
  /** The request's address (absent likewise), for the log lines of what the actor ends. */
  address?: string
}

/** 401 and the cookie cleared: the session has ended, or the member behind it is gone. */
export async function endedSession(event: H3Event): Promise<never> {
  await clearUserSession(event)
  throw createError({ statusCode: 401, statusMessage: 'Unauthorized', message: 'Please sign in again' })
}

/**
 * The signed-in member, read fresh from the database on every request through the session's row:
 * one query checks that the session has not ended (signed out, revoked, past its lifetime or idle
 * timeout) and loads the membership, account and club, so a removed role or a suspension bites at
 * once. Nothing in the cookie but the session id is trusted. 401 when not signed in; 401 and the
 * cookie cleared when the session has ended.
 */
export async function requireMember(event: H3Event): Promise<Actor> {
  if (event.context.actor) return event.context.actor as Actor
  const session = await requireUserSession(event)
  const live = await loadLiveSession(session.secure?.sessionId)
  if (!live) return endedSession(event)
  const { user, membership, club } = live
  const status = membershipStatus(membership, { timeZone: club.timeZone, graceDays: club.graceDays })
  const actor: Actor = {
    user, membership, club, roles: normaliseRoles(membership.roles), status,
    sessionId: live.sessionId, address: requestAddress(event),
  }
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
