import type { Transaction } from 'sequelize'
import { Club, Membership, User } from '../../models'
import { recordAudit } from '../audit'
import { clubBaseUrl, clubToday, homeClub } from '../clubs'
import { enqueueNotice, kickNoticeQueue } from '../notices'
import { revokeSessions } from './sessions'
import { consumeToken, issueToken, peekToken, recentTokenCount, revokeTokens } from './tokens'
import { makePasswordHash } from './passwords'
import { linkFor, findUserByEmail, lockAccount, selfActor } from './accounts'

// Password reset: the e-mailed link and the new password.

/** Password-reset requests beyond this many per account in RESET_WINDOW_MINUTES send nothing more. */
const RESET_MAX_PER_WINDOW = 3
const RESET_WINDOW_MINUTES = 15
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
 * Queues a password-reset link when an account with membership in the club uses `email`; does
 * nothing otherwise. Repeated requests beyond a few in a short window send nothing more (no inbox
 * flooding; counted with the account's row locked, so parallel requests cannot outrun the limit).
 * The route starts it without waiting, so the reply never waits on it.
 */
export async function requestPasswordReset(email: string): Promise<void> {
  const club = await homeClub()
  const user = await findUserByEmail(email)
  if (!user) return
  const membership = await Membership.findOne({ where: { userId: user.id, clubId: club.id } })
  if (!membership) return
  const queued = await inTransaction(async (transaction) => {
    await lockAccount(user.id, transaction)
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
  const email = await inTransaction(async (transaction) => {
    const user = await lockAccount(peeked.userId, transaction)
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
  })
  kickNoticeQueue()
  await clearLoginFailures(email.toLowerCase())
}
