import { Op, col, fn, where, type Transaction } from 'sequelize'
import type { Club, Membership } from '../../models'
import { User } from '../../models'
import type { Actor } from '../../utils/auth'
import { clubBaseUrl } from '../clubs'
import { sessionFor, type SessionStart } from './sessions'
import { checkPassword, makePasswordHash, passwordNeedsNewHash } from './passwords'

// Sign-in and what every account flow shares: links, look-ups, the account lock, the self-actor.

/** The e-mailed link to `path` on the club's public address (never the request's host). */
export function linkFor(club: Pick<Club, 'publicUrl'>, path: string, token: string): string {
  return `${clubBaseUrl(club)}${path}?token=${encodeURIComponent(token)}`
}

/** The account whose e-mail is `email`, whatever its case. */
export async function findUserByEmail(email: string, transaction?: Transaction): Promise<User | null> {
  return User.findOne({ where: { [Op.and]: [where(fn('lower', col('email')), email.toLowerCase())] }, transaction })
}

// Verified against when the e-mail is unknown, so a miss costs the same scrypt time as a wrong password.
let dummyHash: Promise<string> | undefined

/**
 * Checks an e-mail and password from `address` and returns the session to start. The attempt is
 * spent against the limits BEFORE the slow hash check, so a burst of parallel guesses cannot outrun
 * them (429), and given back when the password is right; `knownDevice` (this browser signed in to
 * the account before) skips the account's own wait. 401 for any mismatch, the same whether or not
 * the e-mail has an account or the account has no password yet (imported, welcome link not followed):
 * both are checked against the dummy hash, so they cost the same time and count the same.
 */
export async function signIn(email: string, password: string, address: string, knownDevice = false): Promise<SessionStart> {
  const account = email.toLowerCase()
  const attempt = await claimLoginAttempt(account, address, knownDevice)
  const user = await findUserByEmail(account)
  dummyHash ??= makePasswordHash('not-a-real-password-0000')
  // An account without a password (imported, or an erased member's) is checked against the dummy, like no account.
  const hash = user?.passwordHash ?? null
  const ok = hash ? await checkPassword(hash, password) : (await checkPassword(await dummyHash, password), false)
  if (ok && user && hash) await upgradePasswordHash({ id: user.id, passwordHash: hash }, password)
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
export async function upgradePasswordHash(user: { id: string, passwordHash: string }, password: string): Promise<boolean> {
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
 * Locks account `userId`'s row (utils/locks.ts) and returns it. Account writes take this lock before
 * touching the account's links or notices, so two of them for one account queue up instead of deadlocking.
 */
export async function lockAccount(userId: string, transaction: Transaction): Promise<User> {
  const user = await lockUser(userId, transaction)
  if (!user) throw new Error(`account ${userId} vanished while it was being changed`)
  return user
}

/** The member as the actor of their own action (sign-up, password reset), for the audit trail. */
export function selfActor(user: User, membership: Membership, club: Club): Actor {
  return { user, membership, club, roles: ['member'], status: 'pending' }
}
