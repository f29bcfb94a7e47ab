// Two app servers on one database, behind no proxy: nothing that decides a request lives only in one
// process's memory. Sessions, sign-in counts and the notice queue's claims are all in PostgreSQL.
import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { startAppServer } from '../../scripts/lib/processes.mjs'
import { ROOT, TEST } from '../../scripts/lib/config.mjs'
import { api, sessionCookieOf } from '../support/http'
import { makeMember } from '../support/factories'
import { mailsTo, waitForMail } from '../support/mail'
import { serverEnv, DEMO } from '../support/test-env'
import { signIn } from '../support/global-setup'
import { sql } from '../support/db'

const PORTS = [TEST.spareBase + 14, TEST.spareBase + 15]
const [one, two] = PORTS.map(port => `http://127.0.0.1:${port}`) as [string, string]

type Child = Awaited<ReturnType<typeof startAppServer>>
let servers: Child[] = []

beforeAll(async () => {
  servers = await Promise.all(PORTS.map(port => startAppServer({
    root: ROOT,
    port,
    // Both servers believe the same public address, as two servers behind one load balancer do.
    env: serverEnv({ NUXT_LOGIN_MAX_PER_ACCOUNT_ADDRESS: '2' }),
  })))
})

afterAll(async () => {
  await Promise.all(servers.map(s => s.stop()))
})

const login = (baseUrl: string, email: string, password: string) =>
  api('/api/auth/login', { method: 'POST', body: { email, password }, baseUrl })

describe('two app servers on one database', () => {
  it('a session begun on one works on the other and ends on both at sign-out', async () => {
    const member = await makeMember()
    const cookie = sessionCookieOf(await login(one, member.email, member.password))
    expect((await api('/api/me/standing', { as: cookie, baseUrl: two })).status).toBe(200)

    expect((await api('/api/auth/logout', { method: 'POST', as: cookie, baseUrl: one })).status).toBeLessThan(300)
    expect((await api('/api/me/standing', { as: cookie, baseUrl: one })).status).toBe(401)
    expect((await api('/api/me/standing', { as: cookie, baseUrl: two })).status).toBe(401)
  })

  it('failed sign-ins counted on one are refused on the other', async () => {
    const member = await makeMember()
    for (const _ of [1, 2]) expect((await login(one, member.email, 'not-the-password-at-all')).status).toBe(401)
    const third = await login(two, member.email, 'not-the-password-at-all')
    expect(third.status).toBe(429)
    expect(Number(third.headers.get('retry-after'))).toBeGreaterThan(0)
  })

  it('two queue runs, one per server, send each notice once', async () => {
    // Members whose dues run out in 10 days: the scan queues one reminder each.
    const members = await Promise.all([1, 2, 3, 4].map(() => makeMember({ paidDays: 10 })))
    const cookies = await Promise.all([one, two].map(base => signIn(base, DEMO.admin, DEMO.password)))
    const runs = await Promise.all([one, two].map((baseUrl, i) =>
      api('/api/outbox/run', { method: 'POST', as: cookies[i], baseUrl })))
    for (const run of runs) expect(run.status).toBe(200)

    for (const m of members) await waitForMail(m.email, /dues/i)
    // A further run on each server finds nothing more to send for them.
    await Promise.all([one, two].map((baseUrl, i) => api('/api/outbox/run', { method: 'POST', as: cookies[i], baseUrl })))
    for (const m of members) {
      expect(await mailsTo(m.email)).toHaveLength(1)
      const rows = await sql<{ status: string }>(`SELECT status FROM notices WHERE membership_id = $1`, [m.memberId])
      expect(rows.map(r => r.status)).toEqual(['sent'])
    }
  })
})
