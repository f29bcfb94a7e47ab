import type { Transaction } from 'sequelize'
import { Membership, User } from '../models'
import { membershipStatus, type MembershipStatus } from '../../shared/utils/membership-status'
import { normaliseRoles, type Role } from '../../shared/utils/permissions'
import type { MemberEdit } from '../../shared/schemas/member'
import type { MemberDto } from '../../shared/types/dto'
import type { Actor } from '../utils/auth'
import type { Reason } from '../utils/errors'
import { recordAudit } from './audit'
import { clubBaseUrl, clubToday } from './clubs'
import { enqueueNotice } from './notices'
import { kickNoticeQueue } from './notice-queue'
import { loadMemberDto } from './members'

export const MEMBERSHIP_ACTIONS = ['approve', 'suspend', 'reinstate', 'resign', 'rejoin'] as const
export type MembershipActionName = typeof MEMBERSHIP_ACTIONS[number]

type Changes = Partial<Pick<Membership, 'approvedAt' | 'suspendedAt' | 'suspendedReason' | 'resignedAt'>>

interface ActionRule {
  /** Why the action is refused for this membership, or null when it may go ahead. */
  refusal: (m: Membership, status: MembershipStatus, actor: Actor) => Reason | null
  /** The columns the action sets. */
  changes: (reason: string, now: Date) => Changes
}

const selfAction = (m: Membership, actor: Actor, verb: string): Reason | null =>
  m.id === actor.membership.id ? { code: 'SELF_ACTION', message: `You cannot ${verb} your own membership; ask another admin.` } : null

/** The membership actions an admin takes, each with the rule that may refuse it. */
const RULES: Record<MembershipActionName, ActionRule> = {
  approve: {
    refusal: (m, status) => {
      if (m.approvedAt) return { code: 'ALREADY_APPROVED', message: 'This sign-up has already been approved.' }
      if (status !== 'pending') return { code: 'NOT_PENDING', message: `Only a pending sign-up can be approved; this membership is ${status}.` }
      return null
    },
    changes: (_reason, now) => ({ approvedAt: now }),
  },
  suspend: {
    refusal: (m, status, actor) => selfAction(m, actor, 'suspend')
      ?? (status === 'suspended' ? { code: 'ALREADY_SUSPENDED', message: 'This membership is already suspended.' } : null)
      ?? (status === 'resigned' ? { code: 'MEMBER_RESIGNED', message: 'A resigned membership cannot be suspended.' } : null),
    changes: (reason, now) => ({ suspendedAt: now, suspendedReason: reason }),
  },
  reinstate: {
    refusal: m => (m.suspendedAt ? null : { code: 'NOT_SUSPENDED', message: 'Only a suspended membership can be reinstated.' }),
    changes: () => ({ suspendedAt: null, suspendedReason: null }),
  },
  resign: {
    refusal: (m, _status, actor) => selfAction(m, actor, 'resign')
      ?? (m.resignedAt ? { code: 'ALREADY_RESIGNED', message: 'This membership is already marked resigned.' } : null),
    changes: (_reason, now) => ({ resignedAt: now }),
  },
  rejoin: {
    refusal: m => (m.resignedAt ? null : { code: 'NOT_RESIGNED', message: 'Only a resigned membership can rejoin.' }),
    changes: () => ({ resignedAt: null }),
  },
}

const statusIn = (m: Pick<Membership, 'paidThrough' | 'suspendedAt' | 'resignedAt'>, actor: Actor) =>
  membershipStatus(m, { timeZone: actor.club.timeZone, graceDays: actor.club.graceDays })

/** The membership `id` in the actor's club, locked for the rest of `transaction`; 404 when not there. */
async function lockMembership(actor: Actor, id: string, transaction: Transaction): Promise<Membership> {
  const m = await Membership.findOne({ where: { id, clubId: actor.club.id }, transaction, lock: transaction.LOCK.UPDATE })
  if (!m) notFound('No such member')
  return m
}

/** The member DTO after a change (the change is committed, so the row is there). */
async function reload(actor: Actor, id: string): Promise<MemberDto> {
  const dto = await loadMemberDto(actor.club.id, id)
  if (!dto) notFound('No such member')
  return dto
}

/** Queues the "sign-up approved" e-mail for membership `m` inside `transaction`. */
async function queueApproval(actor: Actor, m: Membership, transaction: Transaction): Promise<void> {
  const user = await User.findByPk(m.userId, { transaction })
  if (!user) return
  await enqueueNotice({
    clubId: actor.club.id,
    membershipId: m.id,
    kind: 'signup_approved',
    dueOn: clubToday(actor.club),
    toEmail: user.email,
    optOuts: m.noticeOptOuts,
    vars: { clubName: actor.club.name, memberName: user.name, baseUrl: clubBaseUrl(actor.club) },
  }, transaction)
}

/**
 * Approves, suspends, reinstates, marks resigned or rejoins membership `id` of the actor's club, in
 * one transaction with its audit event (before → after, with the reason). 404 for a membership of
 * another club; 422 with a reason code when the rule refuses. Approval queues the welcome e-mail.
 */
export async function changeMembership(actor: Actor, id: string, action: MembershipActionName, reason: string): Promise<MemberDto> {
  const rule = RULES[action]
  await useDb().transaction(async (transaction) => {
    const m = await lockMembership(actor, id, transaction)
    const status = statusIn(m, actor)
    const refusal = rule.refusal(m, status, actor)
    if (refusal) refuse(refusal)
    const changes = rule.changes(reason, new Date())
    const before: Record<string, unknown> = { status }
    for (const key of Object.keys(changes) as (keyof Changes)[]) before[key] = m[key]
    await m.update(changes, { transaction })
    await recordAudit(actor, actor.club.id, {
      action: `member.${action}`,
      subjectType: 'membership',
      subjectId: m.id,
      before,
      after: { status: statusIn(m, actor), ...changes },
      reason,
    }, transaction)
    if (action === 'approve') await queueApproval(actor, m, transaction)
  })
  if (action === 'approve') kickNoticeQueue()
  return reload(actor, id)
}

const USER_FIELDS = ['name'] as const
const MEMBERSHIP_FIELDS = ['phone', 'emergencyContactName', 'emergencyContactPhone', 'unitPreference', 'birthDate',
  'guardianName', 'guardianEmail'] as const

/**
 * Edits a member's details (name on the account; contact, birth date and guardian on the membership)
 * in one transaction. The audit event carries before and after of the fields that really changed;
 * nothing changed, nothing written.
 */
export async function editMember(actor: Actor, id: string, edit: MemberEdit): Promise<MemberDto> {
  await useDb().transaction(async (transaction) => {
    const m = await lockMembership(actor, id, transaction)
    const user = await User.findByPk(m.userId, { transaction, lock: transaction.LOCK.UPDATE })
    if (!user) notFound('No such member')
    const before: Record<string, unknown> = {}
    const after: Record<string, unknown> = {}
    const diff = <T extends object>(target: T, fields: readonly string[]) => {
      const set: Record<string, unknown> = {}
      for (const field of fields) {
        const next = edit[field as keyof MemberEdit]
        const current = (target as Record<string, unknown>)[field] ?? null
        if (next === undefined || next === current) continue
        before[field] = current
        after[field] = next
        set[field] = next
      }
      return set
    }
    const userSet = diff(user, USER_FIELDS)
    const memberSet = diff(m, MEMBERSHIP_FIELDS)
    if (!Object.keys(after).length) return
    if (Object.keys(userSet).length) await user.update(userSet, { transaction })
    if (Object.keys(memberSet).length) await m.update(memberSet, { transaction })
    await recordAudit(actor, actor.club.id, { action: 'member.edit', subjectType: 'membership', subjectId: m.id, before, after }, transaction)
  })
  return reload(actor, id)
}

/**
 * Sets membership `id`'s roles ('member' is always kept) with an audit event holding the roles
 * before and after and the reason. Nobody changes their own roles (422 OWN_ROLES). Roles bite on the
 * member's next request, because requireMember reads them from the database every time.
 */
export async function assignRoles(actor: Actor, id: string, roles: Role[], reason: string): Promise<MemberDto> {
  if (id === actor.membership.id) {
    refuse({ code: 'OWN_ROLES', message: 'You cannot change your own roles; another admin has to do it.' })
  }
  const next = normaliseRoles(roles)
  await useDb().transaction(async (transaction) => {
    const m = await lockMembership(actor, id, transaction)
    const current = normaliseRoles(m.roles)
    if (current.join() === next.join()) return
    await m.update({ roles: next }, { transaction })
    await recordAudit(actor, actor.club.id, {
      action: 'member.roles',
      subjectType: 'membership',
      subjectId: m.id,
      before: { roles: current },
      after: { roles: next },
      reason,
    }, transaction)
  })
  return reload(actor, id)
}
