/**
 * Verifying a signed fill snapshot, in the browser and in the tests alike (Web Crypto and `atob` only,
 * no Node API): the signature is checked over the exact bytes the server sent, and only then are those
 * bytes decoded and parsed. A snapshot of another shape version is refused like a bad signature.
 */
import { FILL_SNAPSHOT_VERSION, type FillSnapshot, type FillSnapshotKeyDto } from '../types/fill-snapshots'

/** The bytes of base64 text `b64`, or null when it is not base64. */
export function base64Bytes(b64: string): Uint8Array<ArrayBuffer> | null {
  let binary: string
  try {
    binary = atob(b64)
  }
  catch {
    return null
  }
  const bytes = new Uint8Array(binary.length)
  for (let i = 0; i < binary.length; i++) bytes[i] = binary.charCodeAt(i)
  return bytes
}

/**
 * The snapshot in `snapshotB64` when `signatureB64` is the club key `keyJwk`'s ECDSA P-256 / SHA-256
 * signature (IEEE P1363, r ‖ s) over its bytes, else null (a changed byte, another key, bad base64, not
 * JSON, or another shape version).
 */
export async function verifySnapshotBytes(keyJwk: FillSnapshotKeyDto['publicKeyJwk'], snapshotB64: string, signatureB64: string): Promise<FillSnapshot | null> {
  const bytes = base64Bytes(snapshotB64)
  const signature = base64Bytes(signatureB64)
  if (!bytes || !signature || signature.length !== 64) return null
  try {
    const subtle = globalThis.crypto.subtle
    const key = await subtle.importKey('jwk', { kty: keyJwk.kty, crv: keyJwk.crv, x: keyJwk.x, y: keyJwk.y, ext: true }, { name: 'ECDSA', namedCurve: 'P-256' }, false, ['verify'])
    const ok = await subtle.verify({ name: 'ECDSA', hash: 'SHA-256' }, key, signature, bytes)
    if (!ok) return null
    const snapshot = JSON.parse(new TextDecoder().decode(bytes)) as FillSnapshot
    return snapshot?.version === FILL_SNAPSHOT_VERSION ? snapshot : null
  }
  catch {
    return null
  }
}
