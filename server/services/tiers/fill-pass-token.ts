import { createHmac, timingSafeEqual } from 'node:crypto'

/**
 * Fill-pass tokens, pure: the pass id (a UUID, 16 bytes) followed by the first 16 bytes of an
 * HMAC-SHA256 over it, base64url — 43 characters, short enough for a QR code a phone reads at arm's
 * length. Without the key nobody can make a token for another pass id (128-bit tag). Whether the pass
 * is still live (not replaced, not expired) is the database's answer, not the token's.
 */
const ID_BYTES = 16
const TAG_BYTES = 16
/** The length of every fill-pass token. */
export const FILL_PASS_TOKEN_LENGTH = 43

/**
 * The key that signs fill passes, derived from the server's session secret: a key of its own, so a
 * fill pass never helps forge a session or an opt-out link.
 */
export function deriveFillPassKey(sessionSecret: string): string {
  return createHmac('sha256', sessionSecret).update('hoopwise:fill-pass').digest('hex')
}

function tag(key: string, id: Buffer): Buffer {
  return createHmac('sha256', key).update('fill-pass:').update(id).digest().subarray(0, TAG_BYTES)
}

/** The token of pass `passId` (a UUID) signed with `key`. */
export function fillPassToken(key: string, passId: string): string {
  const id = Buffer.from(passId.replace(/-/g, ''), 'hex')
  if (id.length !== ID_BYTES) throw new Error('A fill pass id is a UUID')
  return Buffer.concat([id, tag(key, id)]).toString('base64url')
}

/** The pass id a token carries, or null when the token is malformed or its signature does not match. */
export function readFillPassToken(key: string, token: string): string | null {
  if (token.length !== FILL_PASS_TOKEN_LENGTH || !/^[A-Za-z0-9_-]+$/.test(token)) return null
  const raw = Buffer.from(token, 'base64url')
  if (raw.length !== ID_BYTES + TAG_BYTES) return null
  const id = raw.subarray(0, ID_BYTES)
  if (!timingSafeEqual(tag(key, id), raw.subarray(ID_BYTES))) return null
  const hex = id.toString('hex')
  return `${hex.slice(0, 8)}-${hex.slice(8, 12)}-${hex.slice(12, 16)}-${hex.slice(16, 20)}-${hex.slice(20)}`
}
