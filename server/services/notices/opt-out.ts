import { createHmac, timingSafeEqual } from 'node:crypto'

/**
 * One-click opt-out links that work without signing in: the link carries the member, the kind and
 * an HMAC-SHA256 over both keyed with a server secret (the session password), so it cannot be
 * forged or altered. Pure functions: the caller passes the secret (see optOutSecret in notices.ts).
 */
function sign(secret: string, membershipId: string, kind: string): string {
  return createHmac('sha256', secret).update(`opt-out:${membershipId}:${kind}`).digest('base64url')
}

/**
 * The key that signs opt-out links, derived from the server's session secret: a key of its own, so
 * an opt-out link never helps forge a session.
 */
export function deriveOptOutKey(sessionSecret: string): string {
  return createHmac('sha256', sessionSecret).update('hoopwise:notice-opt-out').digest('hex')
}

/** The opaque token for (member, kind): `<membershipId>.<kind>.<signature>`. */
export function optOutToken(secret: string, membershipId: string, kind: string): string {
  return `${membershipId}.${kind}.${sign(secret, membershipId, kind)}`
}

/** The page a member opens from an e-mail to stop one optional kind (asks them to confirm). */
export function optOutUrl(secret: string, baseUrl: string, membershipId: string, kind: string): string {
  return `${baseUrl}/opt-out?token=${encodeURIComponent(optOutToken(secret, membershipId, kind))}`
}

/** The RFC 8058 one-click address for the List-Unsubscribe header: a POST there opts out at once. */
export function oneClickOptOutUrl(secret: string, baseUrl: string, membershipId: string, kind: string): string {
  return `${baseUrl}/api/notices/opt-out?token=${encodeURIComponent(optOutToken(secret, membershipId, kind))}`
}

/** Reads a token back; null when it is malformed or its signature does not match. */
export function readOptOutToken(secret: string, token: string): { membershipId: string, kind: string } | null {
  const [membershipId, kind, signature, ...rest] = token.split('.')
  if (!membershipId || !kind || !signature || rest.length) return null
  const expected = Buffer.from(sign(secret, membershipId, kind))
  const given = Buffer.from(signature)
  if (expected.length !== given.length || !timingSafeEqual(expected, given)) return null
  return { membershipId, kind }
}
