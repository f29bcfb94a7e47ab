import { createHmac, timingSafeEqual } from 'node:crypto'

/**
 * Known devices: a browser that signed in to an account before carries a long-lived cookie with one
 * entry per account, `<issued seconds>.<HMAC-SHA256 over the account and the time>`, so failed
 * sign-ins for that account from elsewhere never slow its owner down on it. An entry names no
 * account (the server recomputes the HMAC for the e-mail being signed in to), cannot be forged or
 * moved to another account, and ends after the configured number of days. Pure functions: the
 * caller passes the key (see knownDeviceKey in utils/rate-limit.ts).
 */

/** Entries one browser keeps (a shared family computer); the oldest go first. */
export const KNOWN_DEVICE_MAX_ENTRIES = 5

/** The key that signs device entries, derived from the session secret: a key of its own, so an entry never helps forge a session. */
export function deriveKnownDeviceKey(sessionSecret: string): string {
  return createHmac('sha256', sessionSecret).update('hoopwise:known-device').digest('hex')
}

function sign(key: string, account: string, issuedS: number): string {
  return createHmac('sha256', key).update(`known-device:${account.toLowerCase()}:${issuedS}`).digest('base64url')
}

function entries(cookie: string | undefined): Array<{ issuedS: number, signature: string, raw: string }> {
  return (cookie ?? '').split('~').flatMap((raw) => {
    const [issued, signature, ...rest] = raw.split('.')
    const issuedS = Number(issued)
    return issued && signature && !rest.length && Number.isSafeInteger(issuedS) ? [{ issuedS, signature, raw }] : []
  })
}

function entryIsFor(key: string, account: string, issuedS: number, signature: string): boolean {
  const expected = Buffer.from(sign(key, account, issuedS))
  const given = Buffer.from(signature)
  return expected.length === given.length && timingSafeEqual(expected, given)
}

/** True when `cookie` holds an entry for `account` issued within the last `maxAgeS` seconds (and not in the future). */
export function isKnownDevice(key: string, cookie: string | undefined, account: string, nowS: number, maxAgeS: number): boolean {
  return entries(cookie).some(e => e.issuedS <= nowS && nowS - e.issuedS < maxAgeS && entryIsFor(key, account, e.issuedS, e.signature))
}

/**
 * The cookie value after a successful sign-in to `account`: a fresh entry for it first, then the
 * other accounts' entries still within `maxAgeS` (their own entries are not checked: they were
 * signed by us or are worthless), at most KNOWN_DEVICE_MAX_ENTRIES in all.
 */
export function rememberKnownDevice(key: string, cookie: string | undefined, account: string, nowS: number, maxAgeS: number): string {
  const kept = entries(cookie)
    .filter(e => e.issuedS <= nowS && nowS - e.issuedS < maxAgeS && !entryIsFor(key, account, e.issuedS, e.signature))
    .map(e => e.raw)
  return [`${nowS}.${sign(key, account, nowS)}`, ...kept].slice(0, KNOWN_DEVICE_MAX_ENTRIES).join('~')
}
