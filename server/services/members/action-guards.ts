import type { Transaction } from 'sequelize'
import type { Membership } from '../../models'
import { isJunior, membershipStatus, statusKeepsRights, type MembershipStatus } from '#shared/utils/membership-status'
import { rolesCan, type Capability } from '#shared/utils/permissions'
import type { MemberDto } from '#shared/types/members'
import type { MembershipFacts } from '#shared/utils/member-actions'
import type { Actor } from '../../utils/auth'
import { clubToday } from '../clubs'
import { loadMemberDto } from './members'

// What every admin action on a member shares: the locked target row, the rights re-checked on the
// locked actor row, the shared rules' view of a membership, and the DTO after the change.

/** Membership row `m` as the shared action rules see it. */
export function factsOf(m: Membership, status: MembershipStatus, actor: Actor): MembershipFacts {
  return {
    id: m.id,
    status,
    approvedAt: m.approvedAt,
    suspendedAt: m.suspendedAt,
    resignedAt: m.resignedAt,
    junior: isJunior(m.birthDate, clubToday(actor.club)),
    guardianEmail: m.guardianEmail,
    guardianConsentAt: m.guardianConsentAt,
  }
}

export const statusIn = (m: Pick<Membership, 'paidThrough' | 'suspendedAt' | 'resignedAt'>, actor: Actor) =>
  membershipStatus(m, { timeZone: actor.club.timeZone, graceDays: actor.club.graceDays })

export function forbid(capability: Capability): never {
  throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: `You do not have the right to do this (${capability})` })
}

/**
 * Locks the actor's and the target's membership rows FOR UPDATE, always in id order, then checks
 * again on the locked row that the actor still holds `capability` and is neither suspended nor
 * resigned (403 if not). Two admins acting on each other at once thus queue up instead of both
 * going through on rights the other has just taken away. Returns the target row; 404 when `id` is
 * not a membership of the actor's club.
 */
export async function lockForAction(actor: Actor, id: string, capability: Capability, transaction: Transaction): Promise<Membership> {
  const targetId = id.toLowerCase()
  const rows = await lockMemberships([actor.membership.id, targetId], transaction, actor.club.id)
  const self = rows.get(actor.membership.id)
  if (!self || !statusKeepsRights(statusIn(self, actor)) || !rolesCan(self.roles, capability)) forbid(capability)
  const m = rows.get(targetId)
  if (!m) notFound('No such member')
  return m
}

/** The member DTO after a change (the change is committed, so the row is there). */
export async function reload(actor: Actor, id: string): Promise<MemberDto> {
  const dto = await loadMemberDto(actor.club.id, id)
  if (!dto) notFound('No such member')
  return dto
}
