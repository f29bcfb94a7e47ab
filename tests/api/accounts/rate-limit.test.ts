import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { spawn, type ChildProcess } from 'node:child_process'
import { randomUUID } from 'node:crypto'
import { join } from 'node:path'
import { waitForHttp } from '../../../scripts/lib/processes.mjs'
import { ROOT, TEST } from '../../../scripts/lib/config.mjs'
import { serverEnv } from '../../support/test-env'
import { sql } from '../../support/db'
import { clubDay, makeMember, FACTORY_PASSWORD } from '../../support/factories'
import { postFrom, type AddressedResponse } from '../../support/from-address'

// Limits on a server of this file's own, so the bursts here never slow anyone down on the shared
// server: sign-in 3 failures per account and address, 6 per address, 4 per account in a row before
// each try waits 3 s (doubling); 2 sign-ups and 2 reset requests per address an hour; 2 link e-mails
// per recipient a day; 127.0.0.70 and .71 are trusted proxies. Each test sends from loopback
// addresses of its own, so one test's counts never leak into another. The server's stdout is kept:
// sign-in failures and limits are logged there as JSON lines.
const PORT = TEST.spareBase
const BASE = `http://127.0.0.1:${PORT}`
const ENV = serverEnv({
  NUXT_LOGIN_MAX_PER_ACCOUNT_ADDRESS: '3',
  NUXT_LOGIN_MAX_PER_ADDRESS: '6',
  NUXT_LOGIN_MAX_PER_ACCOUNT: '4',
  NUXT_LOGIN_BACKOFF_BASE_SECONDS: '3',
  NUXT_LOGIN_BACKOFF_MAX_SECONDS: '600',
  NUXT_SIGNUP_MAX_PER_ADDRESS: '2',
  NUXT_RESET_REQUEST_MAX_PER_ADDRESS: '2',
  NUXT_MAIL_MAX_PER_RECIPIENT_PER_DAY: '2',
  NUXT_TRUSTED_PROXIES: '127.0.0.70/31',
})

interface LoggedServer { child: ChildProcess, lines: string[] }
let server: LoggedServer | undefined

/** Starts the built server on PORT with ENV, keeping its stdout lines. */
async function startServer(): Promise<LoggedServer> {
  const child = spawn(process.execPath, [join(ROOT, '.output/server/index.mjs')], {
    cwd: ROOT,
    env: { ...process.env, ...ENV, PORT: String(PORT), HOST: '127.0.0.1', NITRO_PORT: String(PORT), NITRO_HOST: '127.0.0.1' },
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  const lines: string[] = []
  let partial = ''
  child.stdout!.setEncoding('utf8').on('data', (chunk: string) => {
    const parts = (partial + chunk).split('\n')
    partial = parts.pop() ?? ''
    lines.push(...parts)
  })
  child.stderr!.resume()
  try {
    await waitForHttp(`${BASE}/api/health`, 60_000)
  }
  catch (error) {
    child.kill('SIGKILL')
    throw error
  }
  return { child, lines }
}

async function stopServer(s: LoggedServer | undefined): Promise<void> {
  if (!s || s.child.exitCode !== null || s.child.signalCode !== null) return
  const exited = new Promise(resolve => s.child.once('exit', resolve))
  s.child.kill('SIGTERM')
  await exited
}

beforeAll(async () => {
  server = await startServer()
})

afterAll(async () => {
  await stopServer(server)
})

const login = (from: string, email: string, password: string, headers: Record<string, string> = {}) =>
  postFrom(from, BASE, '/api/auth/login', { email, password }, headers)
const statuses = (answers: AddressedResponse[]) => answers.map(a => a.status).sort()
const count = (answers: AddressedResponse[], status: number) => answers.filter(a => a.status === status).length
const unknownEmail = () => `nobody-${randomUUID().slice(0, 8)}@test.hoopwise.example`
/** The seconds in "Try again in N seconds" may tick between two answers; the rest must be identical. */
const shape = (res: AddressedResponse) => ({ status: res.status, message: String(res.body?.message).replace(/\d+/g, 'N') })
const retryAfter = (res: AddressedResponse) => Number(res.headers['retry-after'])
const sleep = (ms: number) => new Promise(r => setTimeout(r, ms))
/** The cookie pair (`name=value`) a response set under `name`, for sending back. */
const cookieSet = (res: AddressedResponse, name: string) =>
  (res.headers['set-cookie'] ?? []).map(c => c.split(';')[0]!).find(c => c.startsWith(`${name}=`))

async function burst(from: string, email: string, count: number): Promise<AddressedResponse[]> {
  const answers: AddressedResponse[] = []
  for (let i = 0; i < count; i++) answers.push(await login(from, email, `wrong-password-${i}`))
  return answers
}

/** One wrong password for `email` from each of `addresses`, one after another. */
async function spread(addresses: string[], email: string): Promise<AddressedResponse[]> {
  const answers: AddressedResponse[] = []
  for (const from of addresses) answers.push(await login(from, email, 'wrong-password-spread'))
  return answers
}

const range = (prefix: string, from: number, n: number) => Array.from({ length: n }, (_, i) => `${prefix}${from + i}`)

describe('sign-in limits that an attacker cannot turn against a member', () => {
  it('stops one address guessing one account, while the right password from another address still signs in', async () => {
    const member = await makeMember()
    const answers = await burst('127.0.0.2', member.email, 4)
    expect(answers.map(a => a.status)).toEqual([401, 401, 401, 429])
    expect(answers[3]!.body.message).toMatch(/^Too many failed sign-in attempts\. Try again in \d+ (seconds|minutes)\./)
    expect(retryAfter(answers[3]!)).toBeGreaterThan(0)
    // Even the right password is refused from the guessing address …
    expect((await login('127.0.0.2', member.email, FACTORY_PASSWORD)).status).toBe(429)
    // … but the owner at 127.0.0.1 is not locked out.
    expect((await login('127.0.0.1', member.email, FACTORY_PASSWORD)).status).toBe(200)
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
    // Two failures per account stay under the per-account limits; the address reaches its 6 on the third account.
    for (const m of members.slice(0, 3)) answers.push(...await burst(from, m.email, 2))
    expect(answers.map(a => a.status)).toEqual([401, 401, 401, 401, 401, 401])
    expect((await login(from, members[3]!.email, 'wrong-password-x')).status).toBe(429)
    expect((await login(from, members[4]!.email, FACTORY_PASSWORD)).status).toBe(429)
    expect((await login(from, unknownEmail(), 'wrong-password-x')).status).toBe(429)
    // The same accounts still sign in from another address: the block was the address's.
    expect((await login('127.0.0.46', members[5]!.email, FACTORY_PASSWORD)).status).toBe(200)
  })

  it('makes an account guessed from many addresses wait, longer after each failure (Retry-After 3, 6, 12 s)', async () => {
    const member = await makeMember()
    const addresses = range('127.0.1.', 1, 12)
    // Four failures in a row are free; the fifth is followed by a 3 s wait.
    expect((await spread(addresses.slice(0, 5), member.email)).map(a => a.status)).toEqual([401, 401, 401, 401, 401])
    const waits: number[] = []
    let next = 5
    for (const expected of [3, 6, 12]) {
      const refused = await login(addresses[next]!, member.email, 'wrong-password-y')
      expect(refused.status).toBe(429)
      expect(refused.body.message).toMatch(/^Too many failed sign-in attempts\. Try again in \d+ seconds?\./)
      // Rounded up from what is left of the wait, which began at the failure a moment ago.
      expect(retryAfter(refused)).toBeLessThanOrEqual(expected)
      expect(retryAfter(refused)).toBeGreaterThan(expected / 2)
      waits.push(retryAfter(refused))
      if (expected === 12) break
      await sleep(retryAfter(refused) * 1000 + 200)
      // After the wait one more try reaches the password check, and the next wait doubles.
      expect((await login(addresses[next + 1]!, member.email, 'wrong-password-y')).status).toBe(401)
      next += 2
    }
    expect(waits).toEqual([...waits].sort((a, b) => a - b))
    expect(new Set(waits).size).toBe(3)
  })

  it('lets a browser that signed in before through while the account is being hammered from elsewhere', async () => {
    const member = await makeMember()
    const home = '127.0.0.80'
    const first = await login(home, member.email, FACTORY_PASSWORD)
    expect(first.status).toBe(200)
    const device = cookieSet(first, 'hoopwise_device')
    expect(device).toBeDefined()
    expect(first.headers['set-cookie']!.find(c => c.startsWith('hoopwise_device='))).toMatch(/HttpOnly/i)

    const attack = await spread(range('127.0.2.', 1, 6), member.email)
    expect(attack.map(a => a.status)).toEqual([401, 401, 401, 401, 401, 429])
    // Without the cookie, or with a forged one, even the owner's usual address has to wait …
    expect((await login(home, member.email, FACTORY_PASSWORD)).status).toBe(429)
    const forged = `hoopwise_device=${Math.floor(Date.now() / 1000)}.${'A'.repeat(43)}`
    expect((await login(home, member.email, FACTORY_PASSWORD, { cookie: forged })).status).toBe(429)
    // … with it the owner signs in, from home or travelling.
    expect((await login(home, member.email, FACTORY_PASSWORD, { cookie: device! })).status).toBe(200)
    expect((await login('127.0.0.81', member.email, FACTORY_PASSWORD, { cookie: device! })).status).toBe(200)
    // The cookie is for this account only.
    const other = await makeMember()
    expect((await spread(range('127.0.3.', 1, 5), other.email)).map(a => a.status)).toEqual([401, 401, 401, 401, 401])
    expect((await login(home, other.email, FACTORY_PASSWORD, { cookie: device! })).status).toBe(429)
  })

  it('logs every failure and every refusal as one JSON line: time, account, address, outcome', async () => {
    const member = await makeMember()
    await burst('127.0.0.60', member.email, 4)
    const ours = async () => {
      for (let i = 0; i < 20; i++) {
        const found = server!.lines.filter(l => l.includes(member.email.toLowerCase())).map(l => JSON.parse(l))
        if (found.length >= 4) return found
        await sleep(100)
      }
      return []
    }
    const lines = await ours()
    expect(lines.map(l => l.outcome)).toEqual(['failed', 'failed', 'failed', 'limited'])
    for (const line of lines) {
      expect(line).toMatchObject({ event: 'sign-in', account: member.email.toLowerCase(), address: '127.0.0.60' })
      expect(new Date(line.time).getTime()).toBeGreaterThan(Date.now() - 60_000)
    }
    expect(lines[3]).toMatchObject({ limit: 'account-address', retryAfterSeconds: expect.any(Number) })
  })
})

describe('the client address behind a reverse proxy (NUXT_TRUSTED_PROXIES=127.0.0.70/31)', () => {
  it('ignores a forged X-Forwarded-For from a socket that is not a trusted proxy', async () => {
    const member = await makeMember()
    const forged = (i: number) => ({ 'x-forwarded-for': `198.51.100.${i}` })
    for (let i = 1; i <= 3; i++) expect((await login('127.0.0.72', member.email, 'wrong-password-z', forged(i))).status).toBe(401)
    // A fresh forged address each time changes nothing: the socket is the address counted.
    expect((await login('127.0.0.72', member.email, FACTORY_PASSWORD, forged(9))).status).toBe(429)
    const logged = server!.lines.filter(l => l.includes(member.email.toLowerCase())).map(l => JSON.parse(l).address)
    expect(new Set(logged)).toEqual(new Set(['127.0.0.72']))
  })

  it('reads the client from X-Forwarded-For when the socket is a trusted proxy', async () => {
    const member = await makeMember()
    // A client's own entry on the left is not believed; the proxy's entry on the right is.
    const via = (client: string) => ({ 'x-forwarded-for': `10.0.0.1, ${client}` })
    for (let i = 0; i < 3; i++) expect((await login('127.0.0.70', member.email, 'wrong-password-z', via('203.0.113.5'))).status).toBe(401)
    expect((await login('127.0.0.71', member.email, FACTORY_PASSWORD, via('203.0.113.5'))).status).toBe(429)
    // Another client behind the same proxy is counted apart.
    expect((await login('127.0.0.70', member.email, FACTORY_PASSWORD, via('203.0.113.6'))).status).toBe(200)
  })

  it('counts IPv6 clients behind the proxy by their /64', async () => {
    const member = await makeMember()
    for (let i = 1; i <= 3; i++) {
      expect((await login('127.0.0.70', member.email, 'wrong-password-v6', { 'x-forwarded-for': `2001:db8:5:6::${i}` })).status).toBe(401)
    }
    // Another address of the same /64 is the same client; the next /64 is not.
    expect((await login('127.0.0.70', member.email, FACTORY_PASSWORD, { 'x-forwarded-for': '2001:db8:5:6:ffff::1' })).status).toBe(429)
    expect((await login('127.0.0.70', member.email, FACTORY_PASSWORD, { 'x-forwarded-for': '2001:db8:5:7::1' })).status).toBe(200)
  })
})

describe('sign-in limits under parallel attempts', () => {
  it('lets at most the account-and-address limit (3) of 10 parallel wrong passwords from one address reach the password check', async () => {
    const member = await makeMember()
    const answers = await Promise.all(Array.from({ length: 10 }, (_, i) => login('127.0.0.47', member.email, `wrong-password-${i}`)))
    expect(count(answers, 401)).toBeLessThanOrEqual(3)
    expect(count(answers, 401)).toBeGreaterThan(0)
    expect(count(answers, 401) + count(answers, 429)).toBe(10)
    expect(answers.find(a => a.status === 429)!.body.message).toMatch(/^Too many failed sign-in attempts/)
    // Another address is not locked out.
    expect((await login('127.0.0.48', member.email, FACTORY_PASSWORD)).status).toBe(200)
  })

  it('lets at most the free failures and one more (5) of 10 parallel wrong passwords from 10 addresses through', async () => {
    const member = await makeMember()
    const answers = await Promise.all(range('127.0.4.', 1, 10).map(from => login(from, member.email, 'wrong-password-p')))
    expect(count(answers, 401)).toBeLessThanOrEqual(5)
    expect(count(answers, 401)).toBeGreaterThan(0)
    expect(count(answers, 401) + count(answers, 429)).toBe(10)
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
    expect(retryAfter(refused)).toBeGreaterThan(60)
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

describe('verification and guardian-consent e-mails per recipient and day (2 here)', () => {
  const junior = (from: string, guardianEmail: string, email = unknownEmail()) => postFrom(from, BASE, '/api/auth/signup', {
    name: 'Wren Saltmarsh', email, password: 'a-long-password-1', birthDate: clubDay(-12 * 365),
    guardianName: 'Ash Saltmarsh', guardianEmail,
  })
  const consentNotices = (guardianEmail: string) =>
    sql('SELECT id FROM notices WHERE kind = $1 AND lower(to_email) = lower($2)', ['guardian_consent', guardianEmail])

  it('refuses a third junior sign-up naming the same guardian, whatever the case, so the form cannot mail a stranger', async () => {
    const guardian = `guardian-${randomUUID().slice(0, 8)}@test.hoopwise.example`
    expect((await junior('127.0.5.1', guardian)).status).toBe(201)
    expect((await junior('127.0.5.2', guardian.toUpperCase())).status).toBe(201)
    const third = unknownEmail()
    const refused = await junior('127.0.5.3', guardian, third)
    expect(refused.status).toBe(429)
    expect(refused.body.message).toMatch(/^Enough e-mails went to .* today\. Try again in \d+ hours\./)
    expect(retryAfter(refused)).toBeGreaterThan(23 * 3600)
    expect(await consentNotices(guardian)).toHaveLength(2)
    // Nothing of the refused sign-up stayed.
    expect(await sql('SELECT id FROM users WHERE lower(email) = lower($1)', [third])).toHaveLength(0)
  })

  it('refuses a second re-sent verification link on the day of the sign-up', async () => {
    const email = unknownEmail()
    const created = await postFrom('127.0.5.10', BASE, '/api/auth/signup', { name: 'Tamsin Reedbank', email, password: 'a-long-password-1', birthDate: '1990-05-05' })
    expect(created.status).toBe(201)
    const cookie = cookieSet(created, 'nuxt-session')!
    const resend = () => postFrom('127.0.5.10', BASE, '/api/auth/resend-verification', {}, { cookie })
    expect((await resend()).status).toBe(200)
    const refused = await resend()
    expect(refused.status).toBe(429)
    expect(refused.body.message).toMatch(/^Enough e-mails went to .* today/)
    expect(await sql(`SELECT id FROM notices WHERE kind = 'email_verification' AND lower(to_email) = lower($1)`, [email])).toHaveLength(2)
  })
})

describe('counts kept in PostgreSQL', () => {
  it('survive a restart of the server', async () => {
    const member = await makeMember()
    await burst('127.0.0.90', member.email, 3)
    expect((await login('127.0.0.90', member.email, FACTORY_PASSWORD)).status).toBe(429)
    expect((await sql('SELECT count(*)::int AS n FROM rate_limits'))[0]!.n).toBeGreaterThan(0)
    await stopServer(server)
    server = await startServer()
    expect((await login('127.0.0.90', member.email, FACTORY_PASSWORD)).status).toBe(429)
    expect((await login('127.0.0.91', member.email, FACTORY_PASSWORD)).status).toBe(200)
  })
})
