import { describe, it, expect } from 'vitest'
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'
import { LoginSchema, ResetPasswordSchema, passwordField, signupSchemaFor } from '../../../shared/schemas/auth'
import { COMMON_PASSWORD_MESSAGE, isCommonPassword, serverPasswordField, withServerPassword } from '../../../server/services/accounts/passwords'
import { SCRYPT_MEMORY_BYTES, SCRYPT_OPTIONS, createPasswordHash } from '../../../server/services/accounts/password-hashing'
import { Semaphore, SemaphoreFullError } from '../../../server/services/accounts/semaphore'
import { FACTORY_PASSWORD } from '../../support/factories'
import { DEMO_PASSWORD } from '../../../server/database/seeds/context'

const messageOf = (r: { success: boolean, error?: { issues: { path: (string | number)[], message: string }[] } }, field = 'password') =>
  r.error?.issues.find(i => i.path.join('.') === field)?.message ?? null

describe('new-password rules', () => {
  it.each([
    ['11 characters', 'abcdefghijk', 'At least 12 characters'],
    ['12 characters', 'abcdefghijkl', null],
    ['201 characters', 'x'.repeat(201), 'At most 200 characters'],
  ])('the shared field: %s', (_label, password, message) => {
    expect(messageOf(passwordField.safeParse(password), '')).toBe(message)
  })

  it.each([
    ['password1234', true],
    ['PASSWORD1234', true],
    ['qwertyuiop12', true],
    ['1q2w3e4r5t6y', true],
    [FACTORY_PASSWORD, false],
    ['shingle-launch-pad-7', false],
  ])('the common list: %s is common: %s', (password, common) => {
    expect(isCommonPassword(password)).toBe(common)
  })

  it('the common list is the well-known one (tens of thousands of entries), not a handful', () => {
    // Sampled from the top of the list: each of these is common.
    for (const p of ['123456', 'password', 'qwerty', 'dragon', 'iloveyou', 'trustno1']) expect(isCommonPassword(p)).toBe(true)
  })

  it.each([
    ['short', 'short-pw', 'At least 12 characters'],
    ['common', 'password1234', COMMON_PASSWORD_MESSAGE],
    ['fine', 'shingle-launch-pad-7', null],
  ])('the server field gives the %s password its message', (_label, password, message) => {
    expect(messageOf(serverPasswordField.safeParse(password), '')).toBe(message)
  })

  it('the server sign-up and reset schemas refuse a common password beside the password field', () => {
    const adult = { name: 'Wren Calloway', email: 'wren@example.org', birthDate: '1990-06-01' }
    const signup = signupSchemaFor('2026-06-01', serverPasswordField)
    expect(messageOf(signup.safeParse({ ...adult, password: 'qwertyuiop12' }))).toBe(COMMON_PASSWORD_MESSAGE)
    expect(signup.safeParse({ ...adult, password: 'shingle-launch-pad-7' }).success).toBe(true)
    // The browser's schema (no list) lets it through; the server is the one that knows the list.
    expect(signupSchemaFor('2026-06-01').safeParse({ ...adult, password: 'qwertyuiop12' }).success).toBe(true)
    const reset = withServerPassword(ResetPasswordSchema)
    expect(messageOf(reset.safeParse({ token: 'a'.repeat(43), password: 'qwertyuiop12' }))).toBe(COMMON_PASSWORD_MESSAGE)
    expect(messageOf(reset.safeParse({ token: 'a'.repeat(43), password: 'short' }))).toBe('At least 12 characters')
  })

  it('sign-in applies no new-password rule: the demo password stays valid; the factories\' one is a valid new one', () => {
    expect(LoginSchema.safeParse({ email: 'member@hoopwise.example', password: DEMO_PASSWORD }).success).toBe(true)
    expect(LoginSchema.safeParse({ email: 'member@hoopwise.example', password: 'short' }).success).toBe(true)
    expect(isCommonPassword(DEMO_PASSWORD)).toBe(false)
    expect(serverPasswordField.safeParse(FACTORY_PASSWORD).success).toBe(true)
  })
})

describe('password hash parameters', () => {
  const hash = createPasswordHash()

  it('follows OWASP\'s scrypt setting N=2^15, r=8, p=3 with room for its 32 MiB', () => {
    expect(SCRYPT_OPTIONS).toMatchObject({ cost: 32768, blockSize: 8, parallelization: 3 })
    expect(SCRYPT_MEMORY_BYTES).toBe(32 * 1024 * 1024)
    expect(SCRYPT_OPTIONS.maxMemory).toBeGreaterThan(SCRYPT_MEMORY_BYTES)
  })

  it('encodes N=32768, r=8, p=3 in a new hash, verifies it and needs no re-hash', async () => {
    const made = await hash.make('shingle-launch-pad-7')
    expect(made).toMatch(/^\$scrypt\$n=32768,r=8,p=3\$/)
    expect(await hash.verify(made, 'shingle-launch-pad-7')).toBe(true)
    expect(await hash.verify(made, 'shingle-launch-pad-8')).toBe(false)
    expect(hash.needsReHash(made)).toBe(false)
  })

  it('still verifies a hash made with the old, cheaper parameters and says it needs a re-hash', async () => {
    const old = await new Hash(new Scrypt({})).make('shingle-launch-pad-7')
    expect(old).toMatch(/^\$scrypt\$n=16384,r=8,p=1\$/)
    expect(await hash.verify(old, 'shingle-launch-pad-7')).toBe(true)
    expect(hash.needsReHash(old)).toBe(true)
  })
})

describe('Semaphore (the cap on hashes running at once)', () => {
  /** A task that reports when it starts and finishes only when told. */
  function gated() {
    let release!: () => void
    const done = new Promise<void>(resolve => (release = resolve))
    return { release, done }
  }
  const tick = () => new Promise(resolve => setImmediate(resolve))

  it('runs at most `limit` at once; the others wait their turn in arrival order', async () => {
    const gate = new Semaphore(2)
    const tasks = Array.from({ length: 5 }, gated)
    const started: number[] = []
    let running = 0
    let most = 0
    const all = tasks.map((t, i) => gate.run(async () => {
      started.push(i)
      running += 1
      most = Math.max(most, running)
      await t.done
      running -= 1
      return i
    }))
    await tick()
    expect(started).toEqual([0, 1])
    expect(gate.waiting).toBe(3)
    tasks[1]!.release()
    await tick()
    expect(started).toEqual([0, 1, 2])
    for (const t of tasks) t.release()
    expect(await Promise.all(all)).toEqual([0, 1, 2, 3, 4])
    expect(most).toBe(2)
    expect(gate.active).toBe(0)
    expect(gate.waiting).toBe(0)
  })

  it('refuses at once beyond `maxWaiting` waiting callers', async () => {
    const gate = new Semaphore(1, 1)
    const t = gated()
    const first = gate.run(() => t.done)
    const second = gate.run(async () => 'second')
    await expect(gate.run(async () => 'third')).rejects.toBeInstanceOf(SemaphoreFullError)
    t.release()
    await first
    expect(await second).toBe('second')
  })

  it('gives the turn back when the work throws', async () => {
    const gate = new Semaphore(1)
    await expect(gate.run(async () => {
      throw new Error('boom')
    })).rejects.toThrow('boom')
    expect(await gate.run(async () => 'next')).toBe('next')
    expect(gate.active).toBe(0)
  })

  it.each([0, 1.5, Number.NaN])('refuses a limit of %s', (limit) => {
    expect(() => new Semaphore(limit)).toThrow(RangeError)
  })
})
