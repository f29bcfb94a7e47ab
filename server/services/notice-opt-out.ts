import { createHmac, timingSafeEqual } from 'node:crypto'

/**
 * One-click opt-out links that work without signing in: the link carries the member, the kind and
 * an HMAC-SHA256 over both keyed with the server's session secret, so it cannot be forged or altered.
 */
function secret(): string {
  return useRuntimeConfig().session.password
}

function sign(membershipId: string, kind: string): string {
  return createHmac('sha256', secret()).update(`opt-out:${membershipId}:${kind}`).digest('base64url')
}

/** The opaque token for (member, kind): `<membershipId>.<kind>.<signature>`. */
export function optOutToken(membershipId: string, kind: string): string {
  return `${membershipId}.${kind}.${sign(membershipId, kind)}`
}

/** The page a member opens from an e-mail to stop one optional kind. */
export function optOutUrl(baseUrl: string, membershipId: string, kind: string): string {
  return `${baseUrl}/opt-out?token=${encodeURIComponent(optOutToken(membershipId, kind))}`
}

/** Reads a token back; null when it is malformed or its signature does not match. */
export function readOptOutToken(token: string): { membershipId: string, kind: string } | null {
  const [membershipId, kind, signature, ...rest] = token.split('.')
  if (!membershipId || !kind || !signature || rest.length) return null
  const expected = Buffer.from(sign(membershipId, kind))
  const given = Buffer.from(signature)
  if (expected.length !== given.length || !timingSafeEqual(expected, given)) return null
  return { membershipId, kind }
}
