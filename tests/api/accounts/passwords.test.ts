import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makeMember, setUser, FACTORY_PASSWORD } from '../../support/factories'
import { waitForMail, linkIn } from '../../support/mail'
import { postFrom } from '../../support/from-address'
import { serverEnv } from '../../support/test-env'
import { startAppServer } from '../../../scripts/lib/processes.mjs'
import { ROOT, TEST } from '../../../scripts/lib/config.mjs'
// The words a member reads when the password is on the common-password list.
const COMMON_PASSWORD_MESSAGE = 'This password is among the most common ones and easy to guess. Choose another.'

// New passwords (12 characters, not a common one), the scrypt parameters of stored hashes, the
// re-hash of an old one at sign-in, and the cap on hashes running at once (on a server of its own).

const NEW_PARAMS = /^\$scrypt\$n=32768,r=8,p=3\$/
const uniqueEmail = (label: string) => `${label}-${randomUUID().slice(0, 8)}@test.hoopwise.example`
const signup = (email: string, password: string) =>
  api('/api/auth/signup', { body: { name: 'Corin Saltreed', email, password, birthDate: clubDay(-30 * 365) } })
const hashOf = async (userId: string) => (await sql<{ password_hash: string }>('SELECT password_hash FROM users WHERE id = $1', [userId]))[0]!.password_hash

describe('new passwords', () => {
  it.each([
    ['shorter than 12 characters', 'salt-marsh1', 'At least 12 characters'],
    ['on the common-password list', 'qwertyuiop12', COMMON_PASSWORD_MESSAGE],
    ['on the list in other letter case', 'PASSWORD1234', COMMON_PASSWORD_MESSAGE],
  ])('sign-up refuses a password %s with 400 and a message beside the field', async (_label, password, message) => {
    const email = uniqueEmail('weak')
    const res = await signup(email, password)
    expect(res.status).toBe(400)
    expect(res.body.data.fields).toEqual({ password: message })
    expect(await sql('SELECT id FROM users WHERE email = $1', [email])).toHaveLength(0)
  })

  it('sign-up takes a long, uncommon password and stores it with the new parameters', async () => {
    const email = uniqueEmail('strong')
    const res = await signup(email, 'shingle-launch-pad-7')
    expect(res.status).toBe(201)
    const [row] = await sql<{ password_hash: string }>('SELECT password_hash FROM users WHERE email = $1', [email])
    expect(row!.password_hash).toMatch(NEW_PARAMS)
  })

  it('a reset refuses a short or common password (400, the link still works) and takes a good one', async () => {
    const member = await makeMember()
    expect((await api('/api/auth/password-reset-request', { body: { email: member.email } })).status).toBe(200)
    const token = linkIn(await waitForMail(member.email, /^Reset your .* password/), '/reset-password').searchParams.get('token')!
    for (const [password, message] of [['too-short-1', 'At least 12 characters'], ['1q2w3e4r5t6y', COMMON_PASSWORD_MESSAGE]] as const) {
      const res = await api('/api/auth/password-reset', { body: { token, password } })
      expect(res.status).toBe(400)
      expect(res.body.data.fields).toEqual({ password: message })
    }
    const before = await hashOf(member.userId)
    expect((await api('/api/auth/password-reset', { body: { token, password: 'a-brand-new-password-7' } })).status).toBe(200)
    const after = await hashOf(member.userId)
    expect(after).not.toBe(before)
    expect(after).toMatch(NEW_PARAMS)
  })
})

describe('hashes with older parameters', () => {
  it('re-hashes an old-parameter hash with the new parameters at the next sign-in', async () => {
    const member = await makeMember()
    const old = await new Hash(new Scrypt({ cost: 16384, blockSize: 8, parallelization: 1 })).make(FACTORY_PASSWORD)
    await setUser(member.userId, { passwordHash: old })
    expect((await api('/api/auth/login', { body: { email: member.email, password: 'not-the-password-1' } })).status).toBe(401)
    expect(await hashOf(member.userId)).toBe(old) // a wrong password changes nothing
    expect((await api('/api/auth/login', { body: { email: member.email, password: FACTORY_PASSWORD } })).status).toBe(200)
    const upgraded = await hashOf(member.userId)
    expect(upgraded).not.toBe(old)
    expect(upgraded).toMatch(NEW_PARAMS)
    // The new hash holds the same password.
    expect((await api('/api/auth/login', { body: { email: member.email, password: FACTORY_PASSWORD } })).status).toBe(200)
    expect(await hashOf(member.userId)).toBe(upgraded)
  })
})

// One hash at a time and one more waiting: a burst of sign-ins beyond that is told the server is busy.
const PORT = TEST.spareBase + 13
const BASE = `http://127.0.0.1:${PORT}`
let server: Awaited<ReturnType<typeof startAppServer>> | undefined

describe('the cap on hashes running at once', () => {
  beforeAll(async () => {
    server = await startAppServer({
      root: ROOT,
      port: PORT,
      env: serverEnv({ NUXT_PASSWORD_HASH_CONCURRENCY: '1', NUXT_PASSWORD_HASH_MAX_WAITING: '1' }),
    })
  })

  afterAll(async () => {
    await server?.stop()
  })

  it('answers a burst beyond the running and waiting hashes with 503, and signs in again once it has passed', async () => {
    const members = await Promise.all(Array.from({ length: 5 }, () => makeMember()))
    const answers = await Promise.all(members.map((m, i) =>
      postFrom(`127.0.0.${120 + i}`, BASE, '/api/auth/login', { email: m.email, password: FACTORY_PASSWORD })))
    const statuses = answers.map(a => a.status)
    expect(statuses.every(s => s === 200 || s === 503)).toBe(true)
    expect(statuses.filter(s => s === 200).length).toBeGreaterThanOrEqual(1)
    expect(statuses.filter(s => s === 503).length).toBeGreaterThanOrEqual(1)
    expect(answers.find(a => a.status === 503)!.body.message).toBe('The server is busy checking other passwords. Try again in a moment.')
    const refused = members[statuses.indexOf(503)]!
    expect((await postFrom('127.0.0.130', BASE, '/api/auth/login', { email: refused.email, password: FACTORY_PASSWORD })).status).toBe(200)
  })
})
