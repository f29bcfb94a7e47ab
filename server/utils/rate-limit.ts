import type { H3Event } from 'h3'
import { RateLimiterMemory, RateLimiterRes } from 'rate-limiter-flexible'

// In memory, one process: enough for one server; a second process would need a shared store.
let limiters: {
  account: RateLimiterMemory
  address: RateLimiterMemory
  signup: RateLimiterMemory
  resetRequest: RateLimiterMemory
} | undefined

const HOUR_SECONDS = 3600

function useLimiters() {
  if (!limiters) {
    const config = useRuntimeConfig()
    const duration = Number(config.loginWindowSeconds)
    limiters = {
      account: new RateLimiterMemory({ keyPrefix: 'login-account', points: Number(config.loginMaxPerAccount), duration }),
      address: new RateLimiterMemory({ keyPrefix: 'login-address', points: Number(config.loginMaxPerAddress), duration }),
      signup: new RateLimiterMemory({ keyPrefix: 'signup-address', points: Number(config.signupMaxPerAddress), duration: HOUR_SECONDS }),
      resetRequest: new RateLimiterMemory({
        keyPrefix: 'reset-request-address',
        points: Number(config.resetRequestMaxPerAddress),
        duration: HOUR_SECONDS,
      }),
    }
  }
  return limiters
}

function tooMany(what: string, retryMs: number): never {
  throw createError({
    statusCode: 429,
    statusMessage: 'Too Many Requests',
    message: `${what} Try again in ${Math.max(1, Math.ceil(retryMs / 60_000))} minute(s).`,
  })
}

/** Takes one point from `limiter` for `key`; the limiter's answer when it has none left, else null. */
async function take(limiter: RateLimiterMemory, key: string): Promise<RateLimiterRes | null> {
  try {
    await limiter.consume(key, 1)
    return null
  }
  catch (error) {
    if (error instanceof RateLimiterRes) return error
    throw error
  }
}

const LOGIN_BLOCKED = 'Too many failed sign-in attempts.'

/** The caller's address as the socket sees it (a forwarded header is not trusted). */
export function requestAddress(event: H3Event): string {
  return getRequestIP(event, { xForwardedFor: false }) ?? 'unknown'
}

/**
 * Spends one sign-in attempt of the address and of the account BEFORE the password is checked, so
 * parallel guesses cannot all slip past the limit while the slow hash runs; 429 when either has
 * none left. A refused attempt costs the account nothing (and the address nothing when the
 * account was the one that refused). Pair with `loginSucceeded` on success.
 */
export async function claimLoginAttempt(email: string, address: string): Promise<void> {
  const { account, address: byAddress } = useLimiters()
  const addressFull = await take(byAddress, address)
  if (addressFull) tooMany(LOGIN_BLOCKED, addressFull.msBeforeNext)
  const accountFull = await take(account, email)
  if (accountFull) {
    await byAddress.reward(address, 1)
    tooMany(LOGIN_BLOCKED, accountFull.msBeforeNext)
  }
}

/** A successful sign-in gives its attempt back: clears the account's count and returns the address's point. */
export async function loginSucceeded(email: string, address: string): Promise<void> {
  const { account, address: byAddress } = useLimiters()
  await Promise.all([account.delete(email), byAddress.reward(address, 1)])
}

/** Clears the account's failed sign-ins (after a password reset); the addresses keep their counts. */
export async function clearLoginFailures(email: string): Promise<void> {
  await useLimiters().account.delete(email)
}

/** Counts one sign-up from `address`; 429 past `signupMaxPerAddress` in an hour. */
export async function countSignup(address: string): Promise<void> {
  const full = await take(useLimiters().signup, address)
  if (full) tooMany('Too many sign-ups from your network in the last hour.', full.msBeforeNext)
}

/** Counts one password-reset request from `address`; 429 past `resetRequestMaxPerAddress` in an hour. */
export async function countResetRequest(address: string): Promise<void> {
  const full = await take(useLimiters().resetRequest, address)
  if (full) tooMany('Too many password-reset requests from your network in the last hour.', full.msBeforeNext)
}
