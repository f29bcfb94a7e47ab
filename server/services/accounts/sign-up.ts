import type { Transaction } from 'sequelize'
import type { Club } from '../../models'
import { Membership, User } from '../../models'
import type { Actor } from '../../utils/auth'
import { isJunior } from '#shared/utils/membership-status'
import type { Signup } from '#shared/schemas/auth'
import type { EmailVerifiedDto } from '#shared/types/accounts'
import { recordAudit } from '../audit'
import { clubBaseUrl, clubToday } from '../clubs'
import { enqueueNotice, kickNoticeQueue } from '../notices'
import { sessionFor, type SessionStart } from './sessions'
import { consumeToken, issueToken, recentTokenCount } from './tokens'
import { makePasswordHash } from './passwords'
import { linkFor, findUserByEmail, lockAccount, selfActor } from './accounts'
import { queueGuardianConsent } from './guardian-consent'

// Sign-up and e-mail confirmation.

/** The message for a sign-up with an e-mail already in use: says no more than that. */
export const EMAIL_TAKEN_MESSAGE = 'An account with this e-mail already exists. Sign in, or reset your password.'

/** Fresh verification links a member may ask for per hour. */
const RESEND_MAX_PER_HOUR = 5
/** Issues a verification link and queues it to the account's e-mail; 429 past the address's e-mails for the day. */
async function queueVerification(club: Club, user: User, membership: Membership, transaction: Transaction): Promise<void> {
  await countRecipientMail(user.email, transaction)
  const issued = await issueToken({ userId: user.id, membershipId: membership.id, purpose: 'verify_email' }, transaction)
  await enqueueNotice({
    clubId: club.id,
    membershipId: membership.id,
    kind: 'email_verification',
    subjectKey: issued.id,
    dueOn: clubToday(club),
    toEmail: user.email,
    vars: { clubName: club.name, memberName: user.name, baseUrl: clubBaseUrl(club), actionUrl: linkFor(club, '/verify-email', issued.token) },
  }, transaction)
}

export interface SignupOutcome { session: SessionStart, verificationSentTo: string, guardianConsentSentTo: string | null }

/**
 * Creates the account and a pending membership (not yet approved, never paid) in `club`, in one
 * transaction with the verification notice — and, for a junior, the guardian's consent notice —
 * then starts the notice queue once committed. 409 when the e-mail is taken (whatever its case).
 * `input` has passed `signupSchemaFor(clubToday(club))`, which already makes a junior (under 18 in
 * the club's time zone) name a guardian: the date only moves on, so a junior here was one there.
 */
export async function signUp(input: Signup, club: Club): Promise<SignupOutcome> {
  const junior = isJunior(input.birthDate, clubToday(club))
  if (await findUserByEmail(input.email)) conflict(EMAIL_TAKEN_MESSAGE)
  const passwordHash = await makePasswordHash(input.password)
  const user = await inTransaction(async (transaction) => {
    const created = await User.create({ email: input.email, name: input.name, passwordHash }, { transaction })
    const membership = await Membership.create({
      clubId: club.id,
      userId: created.id,
      roles: ['member'],
      birthDate: input.birthDate,
      guardianName: junior ? input.guardianName : null,
      guardianEmail: junior ? input.guardianEmail : null,
    }, { transaction })
    await queueVerification(club, created, membership, transaction)
    if (junior) await queueGuardianConsent(club, created, membership, transaction)
    await recordAudit(selfActor(created, membership, club), club.id, {
      action: 'member.signed_up',
      subjectType: 'membership',
      subjectId: membership.id,
      // Who signed up is the subject's id; no e-mail, name or guardian is copied into the trail.
      after: { status: 'pending', junior },
    }, transaction)
    return created
    // Two sign-ups racing with one address: the unique index on lower(email) lets one through.
  }, { uniqueMessage: EMAIL_TAKEN_MESSAGE })
  kickNoticeQueue()
  const session = await sessionFor(user)
  if (!session) throw new Error('sign-up left the account without a membership')
  return { session, verificationSentTo: user.email, guardianConsentSentTo: junior ? input.guardianEmail ?? null : null }
}

/** Confirms the e-mail address the link was sent to. The link works once (422 when used, expired or unknown). */
export async function verifyEmail(token: string): Promise<EmailVerifiedDto> {
  const email = await inTransaction(async (transaction) => {
    const row = await consumeToken(token, 'verify_email', transaction)
    const user = await User.findByPk(row.userId, { transaction, rejectOnEmpty: true })
    if (!user.emailVerifiedAt) await user.update({ emailVerifiedAt: new Date() }, { transaction })
    return user.email
  })
  return { verified: true, email }
}

/**
 * E-mails the signed-in member a fresh verification link. 422 when already verified; 429 after a
 * few in an hour (counted with the account's row locked, so parallel requests cannot outrun it).
 */
export async function resendVerification(actor: Actor): Promise<{ sentTo: string }> {
  if (actor.user.emailVerifiedAt) {
    refuse({ code: 'EMAIL_ALREADY_VERIFIED', message: 'Your e-mail address is already confirmed.' })
  }
  await inTransaction(async (transaction) => {
    await lockAccount(actor.user.id, transaction)
    if (await recentTokenCount(actor.user.id, 'verify_email', 60, transaction) >= RESEND_MAX_PER_HOUR) {
      throw createError({ statusCode: 429, statusMessage: 'Too Many Requests', message: 'Several links were sent in the last hour. Check your inbox, or try again later.' })
    }
    await queueVerification(actor.club, actor.user, actor.membership, transaction)
  })
  kickNoticeQueue()
  return { sentTo: actor.user.email }
}
