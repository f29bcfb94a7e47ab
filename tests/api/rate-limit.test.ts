import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { randomUUID } from 'node:crypto'
import { startAppServer } from '../../scripts/lib/processes.mjs'
import { ROOT, TEST } from '../../scripts/lib/config.mjs'
import { serverEnv } from '../support/test-env'
import { makeMember, FACTORY_PASSWORD } from '../support/factories'
import { postFrom, type AddressedResponse } from '../support/from-address'

// Limits on a server of this file's own (sign-in: 3 failures per account, 6 per address; 2 sign-ups
// and 2 reset requests per address an hour), so the bursts here never lock anyone out on the shared
// server. Each test sends from its own loopback address, so the per-address count of one test never
// leaks into another.
const PORT = TEST.spareBase
const BASE = `http://127.0.0.1:${PORT}`
let server: Awaited<ReturnType<typeof startAppServer>> | undefined

beforeAll(async () => {
  server = await startAppServer({
    root: ROOT,
    port: PORT,
    env: serverEnv({
      NUXT_LOGIN_MAX_PER_ACCOUNT: '3',
      NUXT_LOGIN_MAX_PER_ADDRESS: '6',
      NUXT_SIGNUP_MAX_PER_ADDRESS: '2',
      NUXT_RESET_REQUEST_MAX_PER_ADDRESS: '2',
    }),
  })
})

afterAll(async () => {
  await server?.stop()
})

const login = (from: string, email: string, password: string) => postFrom(from, BASE, '/api/auth/login', { email, password })
const statuses = (answers: AddressedResponse[]) => answers.map(a => a.status).sort()
const count = (answers: AddressedResponse[], status: number) => answers.filter(a => a.status === status).length
const unknownEmail = () => `nobody-${randomUUID().slice(0, 8)}@test.hoopwise.example`
/** The minutes in "Try again in N minute(s)" may tick between two answers; the rest must be identical. */
const shape = (res: AddressedResponse) => ({ status: res.status, message: String(res.body?.message).replace(/\d+/g, 'N') })

async function burst(from: string, email: string, count: number): Promise<AddressedResponse[]> {
  const answers: AddressedResponse[] = []
  for (let i = 0; i < count; i++) answers.push(await login(from, email, `wrong-password-${i}`))
  return answers
}

describe('sign-in rate limits', () => {
  it('answers 429 after a burst of wrong passwords for one account, even to the right password', async () => {
    const member = await makeMember()
    const answers = await burst('127.0.0.41', member.email, 4)
    expect(answers.map(a => a.status)).toEqual([401, 401, 401, 429])
    expect(answers[3]!.body.message).toMatch(/^Too many failed sign-in attempts\. Try again in \d+ minute/)
    // The account is locked for the window, from any address.
    expect((await login('127.0.0.42', member.email, FACTORY_PASSWORD)).status).toBe(429)
    // Another account is unaffected.
    const other = await makeMember()
    expect((await login('127.0.0.42', other.email, FACTORY_PASSWORD)).status).toBe(200)
  })

  it('treats an unknown e-mail exactly as a known one: same 401s, then the same 429', async () => {
    const member = await makeMember()
    const known = await burst('127.0.0.43', member.email, 4)
    const unknown = await burst('127.0.0.44', unknownEmail(), 4)
    expect(unknown.map(shape)).toEqual(known.map(shape))
    expect(unknown[0]!.body.message).toBe('E-mail or password is wrong')
  })

  it('answers 429 to an address that spreads failures across several accounts', async () => {
    const from = '127.0.0.45'
    const members = await Promise.all(Array.from({ length: 7 }, () => makeMember()))
    const answers: AddressedResponse[] = []
    // Two failures per account stay under the per-account limit; the address reaches its 6 on the third account.
    for (const m of members.slice(0, 3)) answers.push(...await burst(from, m.email, 2))
    expect(answers.map(a => a.status)).toEqual([401, 401, 401, 401, 401, 401])
    expect((await login(from, members[3]!.email, 'wrong-password-x')).status).toBe(429)
    expect((await login(from, members[4]!.email, FACTORY_PASSWORD)).status).toBe(429)
    expect((await login(from, unknownEmail(), 'wrong-password-x')).status).toBe(429)
    // The same accounts still sign in from another address: the block was the address's.
    expect((await login('127.0.0.46', members[5]!.email, FACTORY_PASSWORD)).status).toBe(200)
  })
})

describe('sign-in rate limits under parallel attempts', () => {
  it('lets at most the account limit (3) of 10 parallel wrong passwords reach the password check; the rest get 429', async () => {
    const member = await makeMember()
    const answers = await Promise.all(Array.from({ length: 10 }, (_, i) => login('127.0.0.47', member.email, `wrong-password-${i}`)))
    expect(count(answers, 401)).toBeLessThanOrEqual(3)
    expect(count(answers, 401)).toBeGreaterThan(0)
    expect(count(answers, 401) + count(answers, 429)).toBe(10)
    expect(answers.find(a => a.status === 429)!.body.message).toMatch(/^Too many failed sign-in attempts/)
    // The account is locked for the window, even to the right password.
    expect((await login('127.0.0.48', member.email, FACTORY_PASSWORD)).status).toBe(429)
  })

  it('lets at most the address limit (6) of 12 parallel wrong passwords for different accounts through', async () => {
    const answers = await Promise.all(Array.from({ length: 12 }, () => login('127.0.0.49', unknownEmail(), 'wrong-password-x')))
    expect(count(answers, 401)).toBeLessThanOrEqual(6)
    expect(count(answers, 401)).toBeGreaterThan(0)
    expect(count(answers, 401) + count(answers, 429)).toBe(12)
  })

  it('gives a successful sign-in its attempt back: eight sign-ins leave the address all its six failures', async () => {
    const from = '127.0.0.50'
    const [member, ...others] = await Promise.all(Array.from({ length: 4 }, () => makeMember()))
    for (let i = 0; i < 8; i++) expect((await login(from, member!.email, FACTORY_PASSWORD)).status).toBe(200)
    const failures: AddressedResponse[] = []
    for (const m of others) failures.push(...await burst(from, m.email, 2))
    expect(statuses(failures)).toEqual([401, 401, 401, 401, 401, 401])
    expect((await login(from, member!.email, FACTORY_PASSWORD)).status).toBe(429)
  })
})

describe('sign-up and reset-request limits per address', () => {
  const signup = (from: string, email: string, birthDate = '1990-05-05') =>
    postFrom(from, BASE, '/api/auth/signup', { name: 'Tamsin Reedbank', email, password: 'a-long-password-1', birthDate })
  const resetRequest = (from: string, email: string) => postFrom(from, BASE, '/api/auth/password-reset-request', { email })

  it('counts only sign-ups that validate, a taken e-mail included, and answers 429 past the limit', async () => {
    const from = '127.0.0.51'
    const taken = await makeMember()
    for (const bad of ['not-an-email', unknownEmail()]) {
      const res = await signup(from, bad, bad.includes('@') ? '1990-02-30' : undefined)
      expect(res.status).toBe(400)
    }
    expect((await signup(from, unknownEmail())).status).toBe(201)
    expect((await signup(from, taken.email)).status).toBe(409)
    const email = unknownEmail()
    const refused = await signup(from, email)
    expect(refused.status).toBe(429)
    expect(refused.body.message).toMatch(/^Too many sign-ups from your network in the last hour\. Try again in \d+ minute/)
    // Another address is unaffected.
    expect((await signup('127.0.0.52', email)).status).toBe(201)
  })

  it('counts only reset requests that validate and answers 429 past the limit, whether or not the e-mail has an account', async () => {
    const from = '127.0.0.53'
    const member = await makeMember()
    for (let i = 0; i < 3; i++) expect((await resetRequest(from, 'not-an-email')).status).toBe(400)
    expect((await resetRequest(from, member.email)).status).toBe(200)
    expect((await resetRequest(from, unknownEmail())).status).toBe(200)
    const refusedKnown = await resetRequest(from, member.email)
    const refusedUnknown = await resetRequest(from, unknownEmail())
    expect(shape(refusedKnown)).toEqual(shape(refusedUnknown))
    expect(refusedKnown.status).toBe(429)
    expect(refusedKnown.body.message).toMatch(/^Too many password-reset requests from your network in the last hour\. Try again in \d+ minute/)
    expect((await resetRequest('127.0.0.54', member.email)).status).toBe(200)
  })
})
