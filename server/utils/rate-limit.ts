import type { RateLimiterRes } from 'rate-limiter-flexible'
import { RateLimiterMemory } from 'rate-limiter-flexible'

let limiters: { account: RateLimiterMemory, address: RateLimiterMemory } | undefined

function useLoginLimiters() {
  if (!limiters) {
    const config = useRuntimeConfig()
    const duration = Number(config.loginWindowSeconds)
    limiters = {
      account: new RateLimiterMemory({ keyPrefix: 'login-account', points: Number(config.loginMaxPerAccount), duration }),
      address: new RateLimiterMemory({ keyPrefix: 'login-address', points: Number(config.loginMaxPerAddress), duration }),
    }
  }
  return limiters
}

function tooMany(retryMs: number): never {
  throw createError({
    statusCode: 429,
    statusMessage: 'Too Many Requests',
    message: `Too many failed sign-in attempts. Try again in ${Math.ceil(retryMs / 60_000)} minute(s).`,
  })
}

/** 429 when this account or this address has used up its failed sign-ins for the window. */
export async function assertLoginAllowed(email: string, address: string): Promise<void> {
  const { account, address: byAddress } = useLoginLimiters()
  const [a, b] = await Promise.all([account.get(email), byAddress.get(address)])
  const blocked = [a, b].filter((r): r is RateLimiterRes => !!r && r.remainingPoints <= 0)
  if (blocked.length) tooMany(Math.max(...blocked.map(r => r.msBeforeNext)))
}

/** Counts one failed sign-in against the account and the address. */
export async function recordLoginFailure(email: string, address: string): Promise<void> {
  const { account, address: byAddress } = useLoginLimiters()
  await Promise.all([account.penalty(email, 1), byAddress.penalty(address, 1)])
}

/** A successful sign-in clears the account's failures (the address keeps its count). */
export async function clearLoginFailures(email: string): Promise<void> {
  await useLoginLimiters().account.delete(email)
}
