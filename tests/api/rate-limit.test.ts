import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { randomUUID } from 'node:crypto'
import { startAppServer } from '../../scripts/lib/processes.mjs'
import { ROOT, TEST } from '../../scripts/lib/config.mjs'
import { serverEnv } from '../support/test-env'
import { makeMember, FACTORY_PASSWORD } from '../support/factories'
import { postFrom, type AddressedResponse } from '../support/from-address'

// Sign-in limits on a server of this file's own (3 failures per account, 6 per address), so the
// bursts here never lock anyone out on the shared server. Each test sends from its own loopback
// address, so the per-address count of one test never leaks into another.
const PORT = TEST.spareBase
const BASE = `http://127.0.0.1:${PORT}`
let server: Awaited<ReturnType<typeof startAppServer>> | undefined

beforeAll(async () => {
  server = await startAppServer({
    root: ROOT,
    port: PORT,
    env: serverEnv({ NUXT_LOGIN_MAX_PER_ACCOUNT: '3', NUXT_LOGIN_MAX_PER_ADDRESS: '6' }),
  })
})

afterAll(async () => {
  await server?.stop()
})

const login = (from: string, email: string, password: string) => postFrom(from, BASE, '/api/auth/login', { email, password })
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
