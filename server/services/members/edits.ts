import { QueryTypes, type Transaction } from 'sequelize'
import { ZodError } from 'zod'
import type { Membership } from '../../models'
import { User } from '../../models'
import { isJunior } from '#shared/utils/membership-status'
import { futureBirthDateIssue, juniorGuardianIssues, type FieldIssue, type MemberEdit } from '#shared/schemas/member'
import type { MemberDto } from '#shared/types/members'
import { MEMBER_ACTION_RULES } from '#shared/utils/member-actions'
import type { Actor } from '../../utils/auth'
import { changedFields, recordAudit } from '../audit'
import { clubToday } from '../clubs'
import { SCRUB_LINKS_SQL, kickNoticeQueue } from '../notices'
import { queueGuardianConsent, revokeTokens } from '../accounts'
import { factsOf, lockForAction, reload, statusIn } from './action-guards'

// Every write here locks through server/utils/locks.ts, in its order: the membership row(s), then
// the account's, then that member's links, notices and sessions.

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
