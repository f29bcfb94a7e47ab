import type { Transaction } from 'sequelize'
import type { Membership } from '../../models'
import { User } from '../../models'
import { isJunior } from '#shared/utils/membership-status'
import type { MemberDto } from '#shared/types/members'
import { approvalBlockers } from '#shared/utils/approval'
import { MEMBER_ACTION_RULES, type MembershipActionName } from '#shared/utils/member-actions'
import type { AuditAction } from '#shared/utils/audit-actions'
import type { Actor } from '../../utils/auth'
import { recordAudit } from '../audit'
import { clubBaseUrl, clubToday } from '../clubs'
import { enqueueNotice, kickNoticeQueue } from '../notices'
import { revokeSessions } from '../accounts'
import { factsOf, lockForAction, reload, statusIn } from './action-guards'

// Every write here locks through server/utils/locks.ts, in its order: the membership row(s), then
// the account's, then that member's links, notices and sessions.

export { MEMBERSHIP_ACTIONS, type MembershipActionName } from '#shared/utils/member-actions'

type Changes = Partial<Pick<Membership, 'approvedAt' | 'suspendedAt' | 'suspendedReason' | 'resignedAt'>>

interface ActionEffect {
  /** The audit-trail action it records. */
  action: AuditAction
  /** The columns the action sets. */
  changes: (reason: string, now: Date) => Changes
}

/** What each membership action records and sets; whether it may go ahead is MEMBER_ACTION_RULES' (shared). */
const EFFECTS: Record<MembershipActionName, ActionEffect> = {
  approve: { action: 'member.approve', changes: (_reason, now) => ({ approvedAt: now }) },
  suspend: { action: 'member.suspend', changes: (reason, now) => ({ suspendedAt: now, suspendedReason: reason }) },
  reinstate: { action: 'member.reinstate', changes: () => ({ suspendedAt: null, suspendedReason: null }) },
  resign: { action: 'member.resign', changes: (_reason, now) => ({ resignedAt: now }) },
  rejoin: { action: 'member.rejoin', changes: () => ({ resignedAt: null }) },
}

/**
 * 422 when sign-up `m` may not be approved yet: its e-mail is unconfirmed (EMAIL_NOT_CONFIRMED), or
 * it is a junior's without the guardian's consent (GUARDIAN_CONSENT_MISSING); both listed when both
 * hold. Reads the account after the membership row is locked (the one lock order). Returns the account.
 */
async function checkApprovalReady(actor: Actor, m: Membership, transaction: Transaction): Promise<User> {
  const user = await User.findByPk(m.userId, { transaction, rejectOnEmpty: true })
  const blockers = approvalBlockers({
    name: user.name,
    emailVerified: !!user.emailVerifiedAt,
    junior: isJunior(m.birthDate, clubToday(actor.club)),
    guardianConsentAt: m.guardianConsentAt,
  })
  if (blockers.length) refuse(blockers)
  return user
}

/** Queues the "sign-up approved" e-mail for membership `m` and its account `user` inside `transaction`. */
async function queueApproval(actor: Actor, m: Membership, user: User, transaction: Transaction): Promise<void> {
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
 * another club; 422 with a reason code when the rule refuses. Approval waits for a confirmed e-mail
 * and, for a junior, the guardian's consent (422 until then), and queues the welcome e-mail.
 */
export async function changeMembership(actor: Actor, id: string, action: MembershipActionName, reason: string): Promise<MemberDto> {
  const rule = EFFECTS[action]
  await inTransaction(async (transaction) => {
    const m = await lockForAction(actor, id, 'members.manage', transaction)
    const status = statusIn(m, actor)
    const refusal = MEMBER_ACTION_RULES[action](factsOf(m, status, actor), actor.membership.id)
    if (refusal) refuse(refusal)
    const account = action === 'approve' ? await checkApprovalReady(actor, m, transaction) : null
    const changes = rule.changes(reason, new Date())
    // Statuses and times only: the suspension's reason is the event's own reason, not copied again.
    const before: Record<string, unknown> = { status }
    const after: Record<string, unknown> = {}
    for (const key of Object.keys(changes) as (keyof Changes)[]) {
      if (key === 'suspendedReason') continue
      before[key] = m[key]
      after[key] = changes[key]
    }
    await m.update(changes, { transaction })
    await recordAudit(actor, actor.club.id, {
      action: rule.action,
      subjectType: 'membership',
      subjectId: m.id,
      before,
      after: { status: statusIn(m, actor), ...after },
      reason,
    }, transaction)
    if (account) await queueApproval(actor, m, account, transaction)
    // A suspended or resigned member signs in again to see their standing, with no capability.
    if (action === 'suspend' || action === 'resign') {
      await revokeSessions({ membershipId: m.id }, action === 'suspend' ? 'suspended' : 'resigned', actor.address ?? null, transaction)
    }
  })
  if (action === 'approve') kickNoticeQueue()
  return reload(actor, id)
}
