import { createHash } from 'node:crypto'

// Pure helpers of the sign-in limits (server/utils/rate-limit.ts holds the limiters themselves).

/**
 * Seconds an account's next sign-in must wait after its `failures`-th failure in a row from browsers
 * that do not know it: none for the first `free`, then `baseS`, doubling with each further failure,
 * never more than `maxS` (exponential backoff: a growing wait, never a wall).
 */
export function backoffSeconds(failures: number, free: number, baseS: number, maxS: number): number {
  if (failures <= free) return 0
  return Math.min(maxS, baseS * 2 ** Math.min(failures - free - 1, 30))
}

/**
 * The key an e-mail address is counted under: a SHA-256 of it in lower case, so the limits table
 * holds no address in clear and every key fits its 255 characters.
 */
export function emailKey(email: string): string {
  return createHash('sha256').update(email.trim().toLowerCase()).digest('base64url')
}

/** "1 second", "15 minutes", "24 hours": how long until the next try, rounded up. */
export function waitWords(ms: number): string {
  const seconds = Math.max(1, Math.ceil(ms / 1000))
  if (seconds < 120) return `${seconds} second${seconds === 1 ? '' : 's'}`
  const minutes = Math.ceil(seconds / 60)
  if (minutes < 120) return `${minutes} minutes`
  return `${Math.ceil(minutes / 60)} hours`
}

export type SignInOutcome = 'failed' | 'limited'

/** Which limit refused a sign-in. */
export type SignInLimit = 'address' | 'account-address' | 'account'

/** The JSON log line for a failed or refused sign-in: time, account (the e-mail tried), address, outcome. */
export function signInLogLine(outcome: SignInOutcome, account: string, address: string, extra: { limit?: SignInLimit, retryAfterSeconds?: number } = {}, now = new Date()): string {
  return JSON.stringify({ time: now.toISOString(), event: 'sign-in', account, address, outcome, ...extra })
}

/** Writes one sign-in log line to stdout (the operator's log collector reads it there). */
export function logSignIn(outcome: SignInOutcome, account: string, address: string, extra: { limit?: SignInLimit, retryAfterSeconds?: number } = {}): void {
  process.stdout.write(`${signInLogLine(outcome, account, address, extra)}\n`)
}
