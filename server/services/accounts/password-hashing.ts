// THE scrypt parameters for every password hash: the server (services/accounts/passwords.ts), the scripts
// (scripts/lib/database.mjs makePasswordHasher: demo seed, admin accounts) and the test factories
// all build their hasher here, so a hash made by any of them verifies everywhere and needs no re-hash.
// No Nuxt or Nitro import: the scripts load this file outside the server.
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'

/**
 * scrypt cost N = 2^15, block size r = 8, parallelisation p = 3: one of the equivalent settings in
 * OWASP's Password Storage Cheat Sheet (scrypt section, "N=2^15 (32 MiB), r=8 (1024 bytes), p=3").
 * One hash holds 128·N·r bytes = 32 MiB while it runs (p runs one after the other in Node), so the
 * memory limit is raised to 64 MiB (the library's default, 32 MiB, is exactly too small). About a
 * third of a second per hash on one core here; services/accounts/passwords.ts caps how many run at once.
 */
export const SCRYPT_OPTIONS = {
  cost: 2 ** 15,
  blockSize: 8,
  parallelization: 3,
  saltSize: 16,
  keyLength: 64,
  maxMemory: 64 * 1024 * 1024,
} as const

/** Memory one hash holds while it runs, in bytes (128·N·r). */
export const SCRYPT_MEMORY_BYTES = 128 * SCRYPT_OPTIONS.cost * SCRYPT_OPTIONS.blockSize

/** A hasher with THE parameters: make, verify, needsReHash (a hash with other parameters needs one). */
export function createPasswordHash(): Hash {
  return new Hash(new Scrypt({ ...SCRYPT_OPTIONS }))
}
