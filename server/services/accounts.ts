import type { H3Event } from 'h3'
import { Op, UniqueConstraintError, col, fn, where, type Transaction } from 'sequelize'
import { Club, Membership, User } from '../models'
import type { Actor } from '../utils/auth'
import { isJunior } from '../../shared/utils/membership-status'
import type { Signup } from '../../shared/schemas/auth'
import type { EmailVerifiedDto, GuardianConsentDto } from '../../shared/types/accounts'
import { recordAudit } from './audit'
import { clubBaseUrl, clubToday, homeClub } from './clubs'
import { enqueueNotice } from './notices'
import { kickNoticeQueue } from './notice-queue'
import { revokeSessions, sessionFor, type SessionStart } from './sessions'
import { consumeToken, issueToken, peekToken, recentTokenCount, revokeTokens } from './tokens'
import { checkPassword, makePasswordHash, passwordNeedsNewHash } from './passwords'

/** The message for a sign-up with an e-mail already in use: says no more than that. */
export const EMAIL_TAKEN_MESSAGE = 'An account with this e-mail already exists. Sign in, or reset your password.'

/** Password-reset requests beyond this many per account in RESET_WINDOW_MINUTES send nothing more. */
const RESET_MAX_PER_WINDOW = 3
const RESET_WINDOW_MINUTES = 15
/** Fresh verification links a member may ask for per hour. */
const RESEND_MAX_PER_HOUR = 5

/** The e-mailed link to `path` on the club's public address (never the request's host). */
export function linkFor(club: Pick<Club, 'publicUrl'>, path: string, token: string): string {
  return `${clubBaseUrl(club)}${path}?token=${encodeURIComponent(token)}`
}

/** The account whose e-mail is `email`, whatever its case. */
export async function findUserByEmail(email: string, transaction?: Transaction): Promise<User | null> {
  useDb()
  return User.findOne({ where: { [Op.and]: [where(fn('lower', col('email')), email.toLowerCase())] }, transaction })
}

// Verified against when the e-mail is unknown, so a miss costs the same scrypt time as a wrong password.
let dummyHash: Promise<string> | undefined

/**
 * Checks an e-mail and password from `address` and returns the session to start. The attempt is
 * spent against the limits BEFORE the slow hash check, so a burst of parallel guesses cannot outrun
 * them (429), and given back when the password is right; `knownDevice` (this browser signed in to
 * the account before) skips the account's own wait. 401 for any mismatch, the same whether or not
 * the e-mail has an account.
 */
export async function signIn(email: string, password: string, address: string, knownDevice = false): Promise<SessionStart> {
  const account = email.toLowerCase()
  const attempt = await claimLoginAttempt(account, address, knownDevice)
  const user = await findUserByEmail(account)
  dummyHash ??= makePasswordHash('not-a-real-password-0000')
  const ok = user ? await checkPassword(user.passwordHash, password) : (await checkPassword(await dummyHash, password), false)
  if (ok && user) await upgradePasswordHash(user, password)
  const session = ok && user ? await sessionFor(user) : null
  if (!session) {
    await loginFailed(attempt)
    throw createError({ statusCode: 401, statusMessage: 'Unauthorized', message: 'E-mail or password is wrong' })
  }
  await loginSucceeded(attempt)
  return session
}

/**
 * Re-hashes a password that was just verified when its stored hash uses older (cheaper) scrypt
 * parameters, so every account moves to today's on its next sign-in. The write only replaces the
 * hash it read: a password reset in between wins. A failure (say, the server too busy for one more
 * hash) is logged and leaves the old hash for the next sign-in; the sign-in goes on.
 */
export async function upgradePasswordHash(user: Pick<User, 'id' | 'passwordHash'>, password: string): Promise<boolean> {
  if (!passwordNeedsNewHash(user.passwordHash)) return false
  try {
    const passwordHash = await makePasswordHash(password)
    const [changed] = await User.update({ passwordHash }, { where: { id: user.id, passwordHash: user.passwordHash } })
    return changed > 0
  }
  catch (error) {
    console.error('[accounts] re-hashing a password failed:', error)
    return false
  }
}

/**
 * Locks account `userId`'s row FOR UPDATE inside `transaction` and returns it. Account writes take
 * this lock before touching the account's links or notices (the lock order is written down in
 * services/member-actions.ts), so two of them for one account queue up instead of deadlocking.
 */
async function lockUser(userId: string, transaction: Transaction): Promise<User> {
  return User.findByPk(userId, { transaction, lock: transaction.LOCK.UPDATE, rejectOnEmpty: true })
}

/** The member as the actor of their own action (sign-up, password reset), for the audit trail. */
function selfActor(user: User, membership: Membership, club: Club): Actor {
  return { user, membership, club, roles: ['member'], status: 'pending' }
}

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

/** Queues the "your password was changed" e-mail for the reset made with link `tokenId`, inside `transaction`. */
async function queuePasswordChanged(club: Club, user: User, membership: Membership, tokenId: string, transaction: Transaction): Promise<void> {
  const today = clubToday(club)
  await enqueueNotice({
    clubId: club.id,
    membershipId: membership.id,
    kind: 'password_changed',
    subjectKey: tokenId,
    dueOn: today,
    toEmail: user.email,
    vars: { clubName: club.name, memberName: user.name, baseUrl: clubBaseUrl(club), changedOn: today },
  }, transaction)
}

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
  let user: User
  try {
    user = await useDb().transaction(async (transaction) => {
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
        action: 'membership.signed_up',
        subjectType: 'membership',
        subjectId: membership.id,
        // Who signed up is the subject's id; no e-mail, name or guardian is copied into the trail.
        after: { status: 'pending', junior },
      }, transaction)
      return created
    })
  }
  catch (error) {
    // Two sign-ups racing with one address: the unique index on lower(email) lets one through.
    if (error instanceof UniqueConstraintError) conflict(EMAIL_TAKEN_MESSAGE)
    mapDbError(error)
  }
  kickNoticeQueue()
  const session = await sessionFor(user)
  if (!session) throw new Error('sign-up left the account without a membership')
  return { session, verificationSentTo: user.email, guardianConsentSentTo: junior ? input.guardianEmail ?? null : null }
}

/** Confirms the e-mail address the link was sent to. The link works once (422 when used, expired or unknown). */
export async function verifyEmail(token: string): Promise<EmailVerifiedDto> {
  const email = await useDb().transaction(async (transaction) => {
    const row = await consumeToken(token, 'verify_email', transaction)
    const user = await User.findByPk(row.userId, { transaction, rejectOnEmpty: true })
    if (!user.emailVerifiedAt) await user.update({ emailVerifiedAt: new Date() }, { transaction })
    return user.email
  }).catch(mapDbError)
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
  await useDb().transaction(async (transaction) => {
    await lockUser(actor.user.id, transaction)
    if (await recentTokenCount(actor.user.id, 'verify_email', 60, transaction) >= RESEND_MAX_PER_HOUR) {
      throw createError({ statusCode: 429, statusMessage: 'Too Many Requests', message: 'Several links were sent in the last hour. Check your inbox, or try again later.' })
    }
    await queueVerification(actor.club, actor.user, actor.membership, transaction)
  }).catch(mapDbError)
  kickNoticeQueue()
  return { sentTo: actor.user.email }
}

/**
 * Queues a password-reset link when an account with membership in the club uses `email`; does
 * nothing otherwise. Repeated requests beyond a few in a short window send nothing more (no inbox
 * flooding; counted with the account's row locked, so parallel requests cannot outrun the limit).
 * Routes call `requestPasswordResetAfterReply` instead, so the reply never waits on it.
 */
export async function requestPasswordReset(email: string): Promise<void> {
  const club = await homeClub()
  const user = await findUserByEmail(email)
  if (!user) return
  const membership = await Membership.findOne({ where: { userId: user.id, clubId: club.id } })
  if (!membership) return
  const queued = await useDb().transaction(async (transaction) => {
    await lockUser(user.id, transaction)
    if (await recentTokenCount(user.id, 'reset_password', RESET_WINDOW_MINUTES, transaction) >= RESET_MAX_PER_WINDOW) return false
    const issued = await issueToken({ userId: user.id, membershipId: membership.id, purpose: 'reset_password' }, transaction)
    await enqueueNotice({
      clubId: club.id,
      membershipId: membership.id,
      kind: 'password_reset',
      subjectKey: issued.id,
      dueOn: clubToday(club),
      toEmail: user.email,
      vars: { clubName: club.name, memberName: user.name, baseUrl: clubBaseUrl(club), actionUrl: linkFor(club, '/reset-password', issued.token) },
    }, transaction)
    return true
  })
  if (queued) kickNoticeQueue()
}

/**
 * Starts `requestPasswordReset(email)` without waiting for it: a known and an unknown e-mail are
 * answered in the same time, so the reply's timing never reveals an account. A failure is logged
 * (the member can ask again); the queue is kicked once the link is queued.
 */
export function requestPasswordResetAfterReply(event: H3Event, email: string): void {
  event.waitUntil(requestPasswordReset(email).catch((error: unknown) => {
    console.error('[accounts] a password-reset request failed:', error)
  }))
}

/**
 * Sets a new password from an e-mailed reset link: uses the link once, stops every other reset
 * link of the account, confirms the e-mail (the link proved it), ends every session of the account
 * (revoked in `sessions`; `address` goes into the log line), clears the sign-in failures and records
 * the change in the audit trail — all in one transaction, which first locks the account's row: two
 * reset links of one account used at once queue up (the second finds its link revoked, 422) instead
 * of deadlocking. 422 when the link cannot be used; 409 if the database still reports a conflict.
 */
export async function resetPassword(token: string, password: string, address: string | null = null): Promise<void> {
  // Look at the link before the slow hash (a dead link costs no scrypt), and hash before the
  // transaction (no transaction waits on it); the conditional consume below still settles races.
  const peeked = await peekToken(token, 'reset_password')
  const passwordHash = await makePasswordHash(password)
  const email = await useDb().transaction(async (transaction) => {
    const user = await lockUser(peeked.userId, transaction)
    const row = await consumeToken(token, 'reset_password', transaction)
    const membership = row.membershipId
      ? await Membership.findByPk(row.membershipId, { transaction, include: [{ model: Club, as: 'club' }] })
      : null
    await User.update({
      passwordHash,
      emailVerifiedAt: user.emailVerifiedAt ?? new Date(),
    }, { where: { id: user.id }, transaction })
    await revokeSessions({ userId: user.id }, 'password_reset', address, transaction)
    const revoked = await revokeTokens(user.id, 'reset_password', transaction)
    if (membership?.club) {
      await recordAudit(selfActor(user, membership, membership.club), membership.clubId, {
        action: 'account.password_reset',
        subjectType: 'user',
        subjectId: user.id,
        after: { otherResetLinksStopped: revoked },
        reason: 'New password set from an e-mailed reset link',
      }, transaction)
      await queuePasswordChanged(membership.club, user, membership, row.id, transaction)
    }
    return user.email
  }).catch(mapDbError)
  kickNoticeQueue()
  await clearLoginFailures(email.toLowerCase())
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
  useDb()
  const row = await peekToken(token, 'guardian_consent')
  return consentDto(await consentContext(row.membershipId))
}

/**
 * Records the guardian's consent from their e-mailed link (works once), with an audit event; the
 * actor is the guardian, who has no account: the trail says "a guardian", never who. The membership
 * row is locked before the link is used (the one lock order, see services/member-actions.ts).
 */
export async function confirmGuardianConsent(token: string): Promise<GuardianConsentDto> {
  const peeked = await peekToken(token, 'guardian_consent')
  return useDb().transaction(async (transaction) => {
    if (peeked.membershipId) await Membership.findByPk(peeked.membershipId, { transaction, lock: transaction.LOCK.UPDATE })
    const row = await consumeToken(token, 'guardian_consent', transaction)
    const m = await consentContext(row.membershipId, transaction)
    // A second link for a junior who already has consent changes nothing (and records nothing).
    if (m.guardianConsentAt) return consentDto(m)
    await m.update({ guardianConsentAt: new Date() }, { transaction })
    await recordAudit(null, m.clubId, {
      action: 'membership.guardian_consent',
      subjectType: 'membership',
      subjectId: m.id,
      before: { guardianConsentAt: null },
      after: { guardianConsentAt: new Date(m.guardianConsentAt!).toISOString() },
      reason: 'Consent confirmed by the guardian from the e-mailed link',
      by: 'guardian',
    }, transaction)
    return consentDto(m)
  }).catch(mapDbError)
}
