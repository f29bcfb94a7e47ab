import type { H3Event } from 'h3'
import type { Transaction } from 'sequelize'
import { RateLimiterPostgres, RateLimiterRes } from 'rate-limiter-flexible'
import { deriveKnownDeviceKey, isKnownDevice, rememberKnownDevice } from '../services/accounts'
import { backoffSeconds, emailKey, logSignIn, waitWords, type SignInLimit } from '../services/accounts'
import { addressGroup, clientAddressFrom, parseTrustedProxies, type TrustedRange } from './client-address'

// Every count lives in PostgreSQL (rate-limiter-flexible's own store, table `rate_limits` from
// migration 0008), so several app servers share them and a restart does not reset them. Keys are
// prefixed per limiter; e-mails are counted by their SHA-256 (emailKey), addresses by addressGroup
// (IPv6 by /64).
const TABLE = 'rate_limits'
const HOUR_SECONDS = 3600
const DAY_SECONDS = 86_400
/** How long an account's run of failures is remembered when no sign-in succeeds. */
const ACCOUNT_FAILURE_MEMORY_SECONDS = DAY_SECONDS
const KNOWN_DEVICE_COOKIE = 'hoopwise_device'

interface Limiters {
  address: RateLimiterPostgres
  accountAddress: RateLimiterPostgres
  accountFailures: RateLimiterPostgres
  accountWait: RateLimiterPostgres
  signup: RateLimiterPostgres
  resetRequest: RateLimiterPostgres
  recipientMail: RateLimiterPostgres
}

let limiters: Limiters | undefined

function store(keyPrefix: string, points: number, duration: number, clearExpiredByTimeout = false): RateLimiterPostgres {
  return new RateLimiterPostgres({
    storeClient: useDb(),
    storeType: 'sequelize',
    tableName: TABLE,
    // Migration 0008 creates the table: the app never runs DDL.
    tableCreated: true,
    clearExpiredByTimeout,
    keyPrefix,
    points,
    duration,
  })
}

function useLimiters(): Limiters {
  if (!limiters) {
    const config = useRuntimeConfig()
    const window = Number(config.loginWindowSeconds)
    limiters = {
      // One limiter sweeps expired rows of the shared table (every 5 minutes); the others need not.
      address: store('login-address', Number(config.loginMaxPerAddress), window, true),
      accountAddress: store('login-account-address', Number(config.loginMaxPerAccountAddress), window),
      accountFailures: store('login-account', Number.MAX_SAFE_INTEGER, ACCOUNT_FAILURE_MEMORY_SECONDS),
      // One attempt per wait: each consume sets its own duration (the growing wait).
      accountWait: store('login-account-wait', 1, 1),
      signup: store('signup-address', Number(config.signupMaxPerAddress), HOUR_SECONDS),
      resetRequest: store('reset-request-address', Number(config.resetRequestMaxPerAddress), HOUR_SECONDS),
      recipientMail: store('mail-recipient', Number(config.mailMaxPerRecipientPerDay), DAY_SECONDS),
    }
  }
  return limiters
}

function tooMany(what: string, retryMs: number): never {
  const retryAfterSeconds = Math.max(1, Math.ceil(retryMs / 1000))
  throw createError({
    statusCode: 429,
    statusMessage: 'Too Many Requests',
    message: `${what} Try again in ${waitWords(retryMs)}.`,
    data: { retryAfterSeconds },
  })
}

/**
 * Runs `action`; when it answers 429 with `data.retryAfterSeconds`, the reply carries that as its
 * `Retry-After` header. The limits are spent inside services, which have no event to set it on.
 */
export async function withRetryAfter<T>(event: H3Event, action: () => Promise<T>): Promise<T> {
  try {
    return await action()
  }
  catch (error) {
    const seconds = isError(error) && error.statusCode === 429 ? (error.data as { retryAfterSeconds?: unknown } | undefined)?.retryAfterSeconds : undefined
    if (typeof seconds === 'number') setResponseHeader(event, 'Retry-After', seconds)
    throw error
  }
}

/** Takes `points` from `limiter` for `key` (for `durationS` when the count starts); the limiter's answer when it has none left, else null. */
async function take(limiter: RateLimiterPostgres, key: string, durationS?: number): Promise<RateLimiterRes | null> {
  try {
    await limiter.consume(key, 1, durationS === undefined ? {} : { customDuration: durationS })
    return null
  }
  catch (error) {
    if (error instanceof RateLimiterRes) return error
    throw error
  }
}

let trusted: TrustedRange[] | undefined

/** NUXT_TRUSTED_PROXIES, parsed once (throws on a malformed entry; server/plugins/trusted-proxies.ts checks it at boot). */
export function trustedProxies(): TrustedRange[] {
  trusted ??= parseTrustedProxies(useRuntimeConfig().trustedProxies as string | string[])
  return trusted
}

/**
 * The caller's address: the socket's, or — only when the socket is a trusted proxy
 * (NUXT_TRUSTED_PROXIES) — the client X-Forwarded-For names (see clientAddressFrom).
 */
export function requestAddress(event: H3Event): string {
  return clientAddressFrom(event.node.req.socket?.remoteAddress, getRequestHeader(event, 'x-forwarded-for'), trustedProxies())
}

let deviceKey: string | undefined

function knownDeviceKey(): string {
  deviceKey ??= deriveKnownDeviceKey(useRuntimeConfig().session.password)
  return deviceKey
}

const knownDeviceMaxAgeS = () => Number(useRuntimeConfig().knownDeviceDays) * DAY_SECONDS
const nowS = () => Math.floor(Date.now() / 1000)

/** True when this browser signed in to `email` before (a signed, unexpired known-device cookie). */
export function isKnownDeviceFor(event: H3Event, email: string): boolean {
  return isKnownDevice(knownDeviceKey(), getCookie(event, KNOWN_DEVICE_COOKIE), email, nowS(), knownDeviceMaxAgeS())
}

/** After a successful sign-in: marks this browser as known to `email` (a long-lived cookie sent only to the sign-in routes). */
export function rememberDevice(event: H3Event, email: string): void {
  const maxAge = knownDeviceMaxAgeS()
  const value = rememberKnownDevice(knownDeviceKey(), getCookie(event, KNOWN_DEVICE_COOKIE), email, nowS(), maxAge)
  setCookie(event, KNOWN_DEVICE_COOKIE, value, { path: '/api/auth', httpOnly: true, secure: true, sameSite: 'strict', maxAge })
}

/** A sign-in attempt that has spent its points; give it to `loginFailed` or `loginSucceeded`. */
export interface LoginAttempt {
  account: string
  address: string
  knownDevice: boolean
  /** The account's wait this attempt opened (0 when none): it runs from the failure, if the password is wrong. */
  waitS: number
}

const LOGIN_BLOCKED = 'Too many failed sign-in attempts.'

function refuseLogin(attempt: LoginAttempt, limit: SignInLimit, retryMs: number): never {
  logSignIn('limited', attempt.account, attempt.address, { limit, retryAfterSeconds: Math.max(1, Math.ceil(retryMs / 1000)) })
  tooMany(LOGIN_BLOCKED, retryMs)
}

/**
 * Spends one sign-in attempt BEFORE the password is checked, so parallel guesses cannot all slip
 * past a limit while the slow hash runs; 429 with a Retry-After when a limit has none left. Three
 * limits, in this order:
 * - the address across accounts (`loginMaxPerAddress` a window): one network guessing many accounts;
 * - the account from this address (`loginMaxPerAccountAddress` a window): a hard stop for one guesser,
 *   which costs the account's owner elsewhere nothing;
 * - the account from browsers that do not know it (`loginMaxPerAccount` failures in a row free, then
 *   each try waits `loginBackoffBaseSeconds`, doubling up to `loginBackoffMaxSeconds`): many guessers
 *   at once are slowed down, never walled off. A browser that signed in to the account before
 *   (`knownDevice`) skips this one, so an attack from elsewhere never locks the owner out of it.
 * A refused attempt gives back the points it took. Pair with `loginFailed` or `loginSucceeded`.
 */
export async function claimLoginAttempt(email: string, address: string, knownDevice = false): Promise<LoginAttempt> {
  const attempt: LoginAttempt = { account: email.toLowerCase(), address, knownDevice, waitS: 0 }
  const l = useLimiters()
  const config = useRuntimeConfig()
  const byAddress = addressGroup(address)
  const account = emailKey(email)
  const accountAddress = `${account}@${byAddress}`

  const addressFull = await take(l.address, byAddress)
  if (addressFull) refuseLogin(attempt, 'address', addressFull.msBeforeNext)
  const pairFull = await take(l.accountAddress, accountAddress)
  if (pairFull) {
    await l.address.reward(byAddress, 1)
    refuseLogin(attempt, 'account-address', pairFull.msBeforeNext)
  }
  if (knownDevice) return attempt

  const failures = await l.accountFailures.consume(account, 1)
  const waitS = backoffSeconds(failures.consumedPoints, Number(config.loginMaxPerAccount), Number(config.loginBackoffBaseSeconds), Number(config.loginBackoffMaxSeconds))
  if (waitS > 0) {
    // The wait gate lets one attempt through at a time (parallel ones are refused); if its password
    // is wrong, loginFailed shuts the gate for the wait.
    const shut = await take(l.accountWait, account, waitS)
    if (shut) {
      await Promise.all([l.address.reward(byAddress, 1), l.accountAddress.reward(accountAddress, 1), l.accountFailures.reward(account, 1)])
      refuseLogin(attempt, 'account', shut.msBeforeNext)
    }
    attempt.waitS = waitS
  }
  return attempt
}

/**
 * After a wrong password (or an unknown e-mail): the points `claimLoginAttempt` took stay spent, the
 * account's wait (when this attempt opened one) runs from now, and the failure is logged.
 */
export async function loginFailed(attempt: LoginAttempt): Promise<void> {
  logSignIn('failed', attempt.account, attempt.address)
  if (attempt.waitS > 0) await useLimiters().accountWait.block(emailKey(attempt.account), attempt.waitS)
}

/**
 * A successful sign-in gives its attempt back: the address's point, this address's count for the
 * account, and — from a browser that did not know the account — the account's run of failures and
 * its wait. From a known browser the run stays: an attack elsewhere goes on being slowed down.
 */
export async function loginSucceeded(attempt: LoginAttempt): Promise<void> {
  const l = useLimiters()
  const byAddress = addressGroup(attempt.address)
  const account = emailKey(attempt.account)
  await Promise.all([
    l.address.reward(byAddress, 1),
    l.accountAddress.delete(`${account}@${byAddress}`),
    ...(attempt.knownDevice ? [] : [l.accountFailures.delete(account), l.accountWait.delete(account)]),
  ])
}

/** Clears the account's run of failed sign-ins and its wait (after a password reset); addresses keep their counts. */
export async function clearLoginFailures(email: string): Promise<void> {
  const l = useLimiters()
  const account = emailKey(email)
  await Promise.all([l.accountFailures.delete(account), l.accountWait.delete(account)])
}

/** Counts one sign-up from `address` (IPv6 by /64); 429 past `signupMaxPerAddress` in an hour. */
export async function countSignup(address: string): Promise<void> {
  const full = await take(useLimiters().signup, addressGroup(address))
  if (full) tooMany('Too many sign-ups from your network in the last hour.', full.msBeforeNext)
}

/** Counts one password-reset request from `address` (IPv6 by /64); 429 past `resetRequestMaxPerAddress` in an hour. */
export async function countResetRequest(address: string): Promise<void> {
  const full = await take(useLimiters().resetRequest, addressGroup(address))
  if (full) tooMany('Too many password-reset requests from your network in the last hour.', full.msBeforeNext)
}

/**
 * Counts one verification or guardian-consent e-mail to `email` (whatever its case); 429 past
 * `mailMaxPerRecipientPerDay` in a day, so the sign-up and re-send forms cannot be turned into a
 * way to mail strangers. Counted before the mail is queued, inside the caller's `transaction` when
 * it has one.
 */
export async function countRecipientMail(email: string, transaction?: Transaction): Promise<void> {
  const full = await take(transaction ? recipientMailIn(transaction) : useLimiters().recipientMail, emailKey(email))
  if (full) tooMany(`Enough e-mails went to ${email} today.`, full.msBeforeNext)
}

/**
 * The per-recipient limiter on `transaction`'s own connection: taking a second connection from the
 * pool while a transaction holds one could starve the pool under a burst, and this way a sign-up
 * that rolls back gives its count back.
 */
function recipientMailIn(transaction: Transaction): RateLimiterPostgres {
  const { connection } = transaction as unknown as { connection: unknown }
  return new RateLimiterPostgres({
    storeClient: connection,
    storeType: 'client',
    tableName: TABLE,
    tableCreated: true,
    clearExpiredByTimeout: false,
    keyPrefix: 'mail-recipient',
    points: Number(useRuntimeConfig().mailMaxPerRecipientPerDay),
    duration: DAY_SECONDS,
  })
}
