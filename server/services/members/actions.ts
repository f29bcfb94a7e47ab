import { QueryTypes, type Transaction } from 'sequelize'
import { ZodError } from 'zod'
import type { Membership } from '../../models'
import { User } from '../../models'
import { isJunior, membershipStatus, statusKeepsRights, type MembershipStatus } from '#shared/utils/membership-status'
import { normaliseRoles, rolesCan, type Capability, type Role } from '#shared/utils/permissions'
import { futureBirthDateIssue, juniorGuardianIssues, type FieldIssue, type MemberEdit } from '#shared/schemas/member'
import type { MemberDto } from '#shared/types/members'
import { approvalBlockers } from '#shared/utils/approval'
import { MEMBER_ACTION_RULES, type MembershipActionName, type MembershipFacts } from '#shared/utils/member-actions'
import type { Actor } from '../../utils/auth'
import { changedFields, recordAudit } from '../audit'
import { clubBaseUrl, clubToday } from '../clubs'
import { SCRUB_LINKS_SQL, enqueueNotice, kickNoticeQueue } from '../notices'
import type { AuditAction } from '#shared/utils/audit-actions'
import { loadMemberDto } from './members'
import { queueGuardianConsent, revokeTokens, revokeSessions } from '../accounts'

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

/** Membership row `m` as the shared action rules see it. */
function factsOf(m: Membership, status: MembershipStatus, actor: Actor): MembershipFacts {
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

const statusIn = (m: Pick<Membership, 'paidThrough' | 'suspendedAt' | 'resignedAt'>, actor: Actor) =>
  membershipStatus(m, { timeZone: actor.club.timeZone, graceDays: actor.club.graceDays })

function forbid(capability: Capability): never {
  throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: `You do not have the right to do this (${capability})` })
}

/**
 * Locks the actor's and the target's membership rows FOR UPDATE, always in id order, then checks
 * again on the locked row that the actor still holds `capability` and is neither suspended nor
 * resigned (403 if not). Two admins acting on each other at once thus queue up instead of both
 * going through on rights the other has just taken away. Returns the target row; 404 when `id` is
 * not a membership of the actor's club.
 */
async function lockForAction(actor: Actor, id: string, capability: Capability, transaction: Transaction): Promise<Membership> {
  const targetId = id.toLowerCase()
  const rows = await lockMemberships([actor.membership.id, targetId], transaction, actor.club.id)
  const self = rows.get(actor.membership.id)
  if (!self || !statusKeepsRights(statusIn(self, actor)) || !rolesCan(self.roles, capability)) forbid(capability)
  const m = rows.get(targetId)
  if (!m) notFound('No such member')
  return m
}

/** The member DTO after a change (the change is committed, so the row is there). */
async function reload(actor: Actor, id: string): Promise<MemberDto> {
  const dto = await loadMemberDto(actor.club.id, id)
  if (!dto) notFound('No such member')
  return dto
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

const USER_FIELDS = ['name'] as const
const MEMBERSHIP_FIELDS = ['phone', 'emergencyContactName', 'emergencyContactPhone', 'unitPreference', 'birthDate',
  'guardianName', 'guardianEmail'] as const

/** 400 with field messages for `issues` (the same body shape as a schema failure). */
function refuseFields(issues: FieldIssue[]): never {
  badInput(new ZodError(issues.map(i => ({ code: 'custom' as const, path: [i.path], message: i.message }))))
}

/**
 * Stops the guardian's outstanding consent links and skips this membership's consent e-mails still
 * waiting in the queue (queued, or sending with an expired lease), blanking their links, inside
 * `transaction`. Returns how many links were stopped.
 */
async function stopConsentLinks(m: Membership, user: User, transaction: Transaction): Promise<number> {
  const stopped = await revokeTokens(user.id, 'guardian_consent', transaction)
  await useDb().query(`
    UPDATE notices SET ${SCRUB_LINKS_SQL}, status = 'skipped', last_error = 'Replaced by a newer consent link',
      locked_until = NULL, updated_at = now()
    WHERE membership_id = :id AND kind = 'guardian_consent'
      AND (status = 'queued' OR (status = 'sending' AND locked_until < now()))`,
  { replacements: { id: m.id }, type: QueryTypes.UPDATE, transaction })
  return stopped
}

/**
 * Stops the guardian's outstanding consent links (and their queued e-mails), issues a fresh one to the current guardian
 * e-mail and audits the request, inside `transaction`. The caller kicks the notice queue after commit.
 */
async function requestConsent(actor: Actor, m: Membership, user: User, reason: string, transaction: Transaction): Promise<void> {
  const linksStopped = await stopConsentLinks(m, user, transaction)
  await queueGuardianConsent(actor.club, user, m, transaction)
  await recordAudit(actor, actor.club.id, {
    action: 'member.guardian_consent_request',
    subjectType: 'membership',
    subjectId: m.id,
    after: { linksStopped },
    reason,
  }, transaction)
}

/**
 * Edits a member's details (name on the account; contact, birth date and guardian on the membership)
 * in one transaction. The audit events name the fields that really changed, never their values (the
 * trail can never be erased): "Changed a name" for a new name, "Edited member details" for the rest,
 * each with the optional reason; nothing changed, nothing written. 400 when the birth date lies in the
 * future (the club's calendar) or a member who is under 18 after the edit lacks a guardian's name
 * or e-mail. A new guardian e-mail clears the consent, stops the old consent links and sends the
 * new guardian a fresh one.
 */
export async function editMember(actor: Actor, id: string, edit: MemberEdit): Promise<MemberDto> {
  const consentQueued = await inTransaction(async (transaction) => {
    const m = await lockForAction(actor, id, 'members.manage', transaction)
    const user = await lockUser(m.userId, transaction)
    if (!user) notFound('No such member')
    const changed: string[] = []
    const diff = <T extends object>(target: T, fields: readonly string[]) => {
      const set: Record<string, unknown> = {}
      for (const field of fields) {
        const next = edit[field as keyof MemberEdit]
        const current = (target as Record<string, unknown>)[field] ?? null
        if (next === undefined || next === current) continue
        changed.push(field)
        set[field] = next
      }
      return set
    }
    const userSet = diff(user, USER_FIELDS)
    const memberSet = diff(m, MEMBERSHIP_FIELDS)
    const today = clubToday(actor.club)
    const next = { birthDate: m.birthDate, guardianName: m.guardianName, guardianEmail: m.guardianEmail, ...memberSet } as
      Pick<Membership, 'birthDate' | 'guardianName' | 'guardianEmail'>
    const future = futureBirthDateIssue(edit.birthDate, today)
    const issues = future ? [future] : juniorGuardianIssues(next, today, user.email)
    if (issues.length) refuseFields(issues)
    if (!changed.length) return false

    const wasJunior = isJunior(m.birthDate, today)
    const guardianChanged = 'guardianEmail' in memberSet
    if (guardianChanged && m.guardianConsentAt) {
      changed.push('guardianConsentAt')
      memberSet.guardianConsentAt = null
    }
    if (Object.keys(userSet).length) await user.update(userSet, { transaction })
    if (Object.keys(memberSet).length) await m.update(memberSet, { transaction })
    const reason = edit.reason ?? null
    if ('name' in userSet) {
      await recordAudit(actor, actor.club.id, { action: 'member.rename', subjectType: 'membership', subjectId: m.id, after: changedFields(['name']), reason }, transaction)
    }
    const others = changed.filter(field => field !== 'name')
    if (others.length) {
      await recordAudit(actor, actor.club.id, { action: 'member.edit', subjectType: 'membership', subjectId: m.id, after: changedFields(others), reason }, transaction)
    }

    // A new guardian (or a member who has just become a junior) is asked for consent afresh.
    const askGuardian = isJunior(m.birthDate, today) && !!m.guardianEmail && !m.guardianConsentAt && (guardianChanged || !wasJunior)
    if (askGuardian) {
      await requestConsent(actor, m, user, reason ?? 'Guardian details changed: consent asked of the new guardian', transaction)
    }
    else if (guardianChanged) await stopConsentLinks(m, user, transaction)
    return askGuardian
  })
  if (consentQueued) kickNoticeQueue()
  return reload(actor, id)
}

/**
 * E-mails the guardian of junior membership `id` a fresh consent link (the older links stop
 * working), audited with `reason`. 422 NOT_JUNIOR, NO_GUARDIAN or ALREADY_CONSENTED when it does not apply.
 */
export async function resendGuardianConsent(actor: Actor, id: string, reason: string): Promise<MemberDto> {
  await inTransaction(async (transaction) => {
    const m = await lockForAction(actor, id, 'members.manage', transaction)
    const refusal = MEMBER_ACTION_RULES['guardian-consent'](factsOf(m, statusIn(m, actor), actor), actor.membership.id)
    if (refusal) refuse(refusal)
    const user = await User.findByPk(m.userId, { transaction })
    if (!user) notFound('No such member')
    await requestConsent(actor, m, user, reason, transaction)
  })
  kickNoticeQueue()
  return reload(actor, id)
}

/**
 * Sets membership `id`'s roles ('member' is always kept) with an audit event holding the roles
 * before and after and the reason. Nobody changes their own roles (422 OWN_ROLES, checked on the
 * locked row). Roles bite on the member's next request, because requireMember reads them from the
 * database every time.
 */
export async function assignRoles(actor: Actor, id: string, roles: Role[], reason: string): Promise<MemberDto> {
  const next = normaliseRoles(roles)
  await inTransaction(async (transaction) => {
    const m = await lockForAction(actor, id, 'roles.assign', transaction)
    if (m.id === actor.membership.id) {
      refuse({ code: 'OWN_ROLES', message: 'You cannot change your own roles; another admin has to do it.' })
    }
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
