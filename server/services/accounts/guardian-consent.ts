import type { Transaction } from 'sequelize'
import { Club, Membership, User } from '../../models'
import type { GuardianConsentDto } from '#shared/types/accounts'
import { recordAudit } from '../audit'
import { clubBaseUrl, clubToday } from '../clubs'
import { enqueueNotice } from '../notices'
import { consumeToken, issueToken, peekToken } from './tokens'
import { linkFor } from './accounts'

// A junior's guardian consent: the e-mailed link, its preview and the consent itself.

/**
 * Issues a guardian-consent link for `membership` and queues it to the guardian's e-mail, inside
 * `transaction`; 429 when the guardian's address has had its e-mails for the day (countRecipientMail).
 */
export async function queueGuardianConsent(club: Club, user: User, membership: Membership, transaction: Transaction): Promise<void> {
  await countRecipientMail(membership.guardianEmail!, transaction)
  const issued = await issueToken({ userId: user.id, membershipId: membership.id, purpose: 'guardian_consent' }, transaction)
  await enqueueNotice({
    clubId: club.id,
    membershipId: membership.id,
    kind: 'guardian_consent',
    subjectKey: issued.id,
    dueOn: clubToday(club),
    toEmail: membership.guardianEmail!,
    vars: {
      clubName: club.name,
      memberName: user.name,
      guardianName: membership.guardianName ?? undefined,
      baseUrl: clubBaseUrl(club),
      actionUrl: linkFor(club, '/guardian-consent', issued.token),
    },
  }, transaction)
}

async function consentContext(membershipId: string | null, transaction?: Transaction) {
  if (!membershipId) refuse({ code: 'TOKEN_INVALID', message: 'This link is not valid. Ask for a new one.' })
  const membership = await Membership.findByPk(membershipId, {
    transaction,
    include: [{ model: User, as: 'user' }, { model: Club, as: 'club' }],
  })
  if (!membership?.user || !membership.club) refuse({ code: 'TOKEN_INVALID', message: 'This link is not valid. Ask for a new one.' })
  return membership as Membership & { user: User, club: Club }
}

function consentDto(m: Membership & { user: User, club: Club }): GuardianConsentDto {
  return {
    memberName: m.user.name,
    clubName: m.club.name,
    guardianName: m.guardianName,
    consentedAt: m.guardianConsentAt ? new Date(m.guardianConsentAt).toISOString() : null,
    timeZone: m.club.timeZone,
  }
}

/** Who the guardian's link is about (junior and club), without using the link. 422 when it cannot be used. */
export async function guardianConsentPreview(token: string): Promise<GuardianConsentDto> {
  const row = await peekToken(token, 'guardian_consent')
  return consentDto(await consentContext(row.membershipId))
}

/**
 * Records the guardian's consent from their e-mailed link (works once), with an audit event; the
 * actor is the guardian, who has no account: the trail says "a guardian", never who. The membership
 * row is locked before the link is used (the one lock order, utils/locks.ts).
 */
export async function confirmGuardianConsent(token: string): Promise<GuardianConsentDto> {
  const peeked = await peekToken(token, 'guardian_consent')
  return inTransaction(async (transaction) => {
    if (peeked.membershipId) await lockMemberships([peeked.membershipId], transaction)
    const row = await consumeToken(token, 'guardian_consent', transaction)
    const m = await consentContext(row.membershipId, transaction)
    // A second link for a junior who already has consent changes nothing (and records nothing).
    if (m.guardianConsentAt) return consentDto(m)
    await m.update({ guardianConsentAt: new Date() }, { transaction })
    await recordAudit(null, m.clubId, {
      action: 'member.guardian_consent',
      subjectType: 'membership',
      subjectId: m.id,
      before: { guardianConsentAt: null },
      after: { guardianConsentAt: new Date(m.guardianConsentAt!).toISOString() },
      reason: 'Consent confirmed by the guardian from the e-mailed link',
      by: 'guardian',
    }, transaction)
    return consentDto(m)
  })
}
