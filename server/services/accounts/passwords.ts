import type { z } from 'zod'
import { dictionary } from '@zxcvbn-ts/language-common'
import { passwordField } from '#shared/schemas/auth'
import { createPasswordHash } from './password-hashing'
import { Semaphore, SemaphoreFullError } from './semaphore'

// Every password hash and check of the server goes through here (never nuxt-auth-utils'
// hashPassword/verifyPassword directly), so the parameters are THE ones of services/accounts/password-hashing.ts
// and no more than NUXT_PASSWORD_HASH_CONCURRENCY hashes hold their 32 MiB at once.

/** The message beside the password field when it is on the common-password list. */
export const COMMON_PASSWORD_MESSAGE = 'This password is among the most common ones and easy to guess. Choose another.'

let common: Set<string> | undefined

/**
 * Whether `password` is on the list of the most common passwords (about 49 000, from the
 * @zxcvbn-ts/language-common package, MIT; it ships with the server and works offline), whatever
 * its case. Server-side only: the list would weigh some 380 KB in the browser bundle.
 */
export function isCommonPassword(password: string): boolean {
  common ??= new Set(dictionary['passwords-common'].map(p => p.toLowerCase()))
  return common.has(password.toLowerCase())
}

/**
 * The new-password rule of the routes: the shared field's rules (length) plus the common-list
 * check, with its own field message (400 `data.fields.password`). Sign-in never applies it.
 */
export const serverPasswordField = passwordField.refine(p => !isCommonPassword(p), COMMON_PASSWORD_MESSAGE)

let hasher: ReturnType<typeof createPasswordHash> | undefined
let gate: Semaphore | undefined

function hashGate(): Semaphore {
  if (!gate) {
    const config = useRuntimeConfig()
    gate = new Semaphore(Math.max(1, Number(config.passwordHashConcurrency) || 1), Math.max(0, Number(config.passwordHashMaxWaiting) || 0))
  }
  return gate
}

/**
 * Runs one hash or check when a turn is free. Beyond the waiting line's length the server is busy:
 * 503 at once (try again in a moment), rather than piling up requests that would each wait for seconds.
 */
async function withTurn<T>(work: () => Promise<T>): Promise<T> {
  try {
    return await hashGate().run(work)
  }
  catch (error) {
    if (!(error instanceof SemaphoreFullError)) throw error
    throw createError({
      statusCode: 503,
      statusMessage: 'Service Unavailable',
      message: 'The server is busy checking other passwords. Try again in a moment.',
    })
  }
}

function passwordHasher() {
  return (hasher ??= createPasswordHash())
}

/** The scrypt hash of `plain` with THE parameters (waits for a turn; 503 when too many wait). */
export function makePasswordHash(plain: string): Promise<string> {
  return withTurn(() => passwordHasher().make(plain))
}

/** Whether `plain` matches `hash`, whatever parameters the hash was made with (waits for a turn). */
export function checkPassword(hash: string, plain: string): Promise<boolean> {
  return withTurn(() => passwordHasher().verify(hash, plain))
}

/** Whether `hash` was made with other parameters than today's (older, cheaper ones): re-hash it. */
export function passwordNeedsNewHash(hash: string): boolean {
  return passwordHasher().needsReHash(hash)
}

/** A new-password schema for the routes (ResetPasswordSchema and the like): `shape` with the server's password field. */
export function withServerPassword<T extends z.ZodRawShape>(schema: z.ZodObject<T>) {
  return schema.extend({ password: serverPasswordField })
}
