import { describe, it, expect } from 'vitest'
import { api, sessionCookieOf } from '../../support/http'
import { linkIn, waitForMail } from '../../support/mail'
import { sql } from '../../support/db'
import { ago, makeMember, setSession, type MadeMember } from '../../support/factories'

// Sessions kept in PostgreSQL: a copied cookie stops working once its session has ended, whichever
// way it ended. Lifetimes are tested by ageing the session rows (defaults: 30 days absolute, 7 idle).

const FIREFOX_LINUX = 'Mozilla/5.0 (X11; Linux x86_64; rv:128.0) Gecko/20100101 Firefox/128.0'
const SAFARI_IPHONE = 'Mozilla/5.0 (iPhone; CPU iPhone OS 17_5 like Mac OS X) AppleWebKit/605.1.15 (KHTML, like Gecko) Version/17.5 Mobile/15E148 Safari/604.1'

/** Signs `m` in (optionally as a given browser) and returns the session cookie. */
async function signIn(m: MadeMember, password = m.password, userAgent?: string): Promise<string> {
  const res = await api('/api/auth/login', { body: { email: m.email, password }, headers: userAgent ? { 'user-agent': userAgent } : {} })
  expect(res.status).toBe(200)
  return sessionCookieOf(res)
}

/** The session id behind the newest session of account `userId`. */
async function newestSession(userId: string): Promise<string> {
  const [row] = await sql<{ id: string }>('SELECT id FROM sessions WHERE user_id = $1 ORDER BY created_at DESC LIMIT 1', [userId])
  return row!.id
}

/** Asserts that `cookie` no longer signs anyone in: 401 on a route and no user on the session endpoint. */
async function expectEnded(cookie: string) {
  const me = await api('/api/me/standing', { as: cookie })
  expect(me.status).toBe(401)
  expect(me.headers.getSetCookie().find(c => c.startsWith('nuxt-session='))).toMatch(/^nuxt-session=;/)
  const shown = await api('/api/_auth/session', { as: cookie })
  expect(shown.status).toBe(401)
  expect(shown.body?.user).toBeUndefined()
}

const adminAction = (memberId: string, action: string) =>
  api(`/api/members/${memberId}/${action}`, { method: 'POST', as: 'admin', body: { reason: 'Decided at the committee meeting' } })

describe('sessions that end', () => {
  it('a cookie copied before sign-out is refused after it', async () => {
    const m = await makeMember()
    const cookie = await signIn(m)
    const copy = cookie
    expect((await api('/api/me/standing', { as: copy })).status).toBe(200)
    expect((await api('/api/auth/logout', { method: 'POST', as: cookie })).status).toBe(200)
    await expectEnded(copy)
    const [row] = await sql<{ revoke_reason: string }>('SELECT revoke_reason FROM sessions WHERE user_id = $1', [m.userId])
    expect(row!.revoke_reason).toBe('signed_out')
  })

  it.each([
    ['suspend', 'suspended'],
    ['resign', 'resigned'],
  ])('%s ends every session of the member, who may sign in again to see their standing with no capability', async (action, status) => {
    const m = await makeMember({ roles: ['instructor'] })
    const [laptop, phone] = [await signIn(m), await signIn(m, m.password, SAFARI_IPHONE)]
    expect((await api('/api/members', { as: laptop })).status).toBe(200)
    expect((await adminAction(m.memberId, action)).status).toBe(200)
    await expectEnded(laptop)
    await expectEnded(phone)

    const again = await signIn(m)
    const me = await api('/api/me/standing', { as: again })
    expect(me.status).toBe(200)
    expect(me.body.member.status).toBe(status)
    expect((await api('/api/members', { as: again })).status).toBe(403)
  })

  it('a password reset ends every session of the account', async () => {
    const m = await makeMember()
    const [a, b] = [await signIn(m), await signIn(m, m.password, FIREFOX_LINUX)]
    expect((await api('/api/auth/password-reset-request', { body: { email: m.email } })).status).toBe(200)
    const token = linkIn(await waitForMail(m.email, /^Reset your .* password/), '/reset-password').searchParams.get('token')!
    const password = 'sessions-after-reset-quill-2741'
    expect((await api('/api/auth/password-reset', { body: { token, password } })).status).toBe(200)
    await expectEnded(a)
    await expectEnded(b)
    expect((await api('/api/me/standing', { as: await signIn(m, password) })).status).toBe(200)
  })

  it('ends a session past its absolute lifetime (30 days), however recently it was used', async () => {
    const m = await makeMember()
    const [young, old] = [await signIn(m), await signIn(m)]
    const [youngId, oldId] = (await sql<{ id: string }>('SELECT id FROM sessions WHERE user_id = $1 ORDER BY created_at', [m.userId])).map(r => r.id)
    await setSession(youngId!, { createdAt: ago('29 days 23 hours') })
    await setSession(oldId!, { createdAt: ago('30 days 1 minute') })
    expect((await api('/api/me/standing', { as: young })).status).toBe(200)
    await expectEnded(old)
  })

  it('ends a session idle for longer than the idle timeout (7 days)', async () => {
    const m = await makeMember()
    const [recent, idle] = [await signIn(m), await signIn(m)]
    const [recentId, idleId] = (await sql<{ id: string }>('SELECT id FROM sessions WHERE user_id = $1 ORDER BY created_at', [m.userId])).map(r => r.id)
    await setSession(recentId!, { createdAt: ago('10 days'), lastSeenAt: ago('6 days 23 hours') })
    await setSession(idleId!, { createdAt: ago('10 days'), lastSeenAt: ago('7 days 1 minute') })
    expect((await api('/api/me/standing', { as: recent })).status).toBe(200)
    await expectEnded(idle)
    // Using the first one moved its "last seen" on, so it is no longer near its idle timeout.
    const [seen] = await sql<{ idle: boolean }>(`SELECT last_seen_at > now() - interval '1 minute' AS idle FROM sessions WHERE id = $1`, [recentId])
    expect(seen!.idle).toBe(true)
  })

  it('writes "last seen" only when it is older than a few minutes, not on every request', async () => {
    const m = await makeMember()
    const cookie = await signIn(m)
    const id = await newestSession(m.userId)
    const lastSeen = async () => (await sql<{ at: string }>('SELECT last_seen_at::text AS at FROM sessions WHERE id = $1', [id]))[0]!.at
    await setSession(id, { lastSeenAt: ago('2 minutes') })
    const before = await lastSeen()
    for (let i = 0; i < 3; i++) expect((await api('/api/me/standing', { as: cookie })).status).toBe(200)
    expect(await lastSeen()).toBe(before)

    await setSession(id, { lastSeenAt: ago('10 minutes') })
    expect((await api('/api/me/standing', { as: cookie })).status).toBe(200)
    const [fresh] = await sql<{ recent: boolean }>(`SELECT last_seen_at > now() - interval '1 minute' AS recent FROM sessions WHERE id = $1`, [id])
    expect(fresh!.recent).toBe(true)
  })
})

describe('my sessions in the profile', () => {
  it('lists my live sessions with device, address and this device marked, and signs out one of them', async () => {
    const m = await makeMember()
    const here = await signIn(m, m.password, FIREFOX_LINUX)
    const hereId = await newestSession(m.userId)
    const phone = await signIn(m, m.password, SAFARI_IPHONE)
    const phoneId = await newestSession(m.userId)
    const ended = await signIn(m)
    expect((await api('/api/auth/logout', { method: 'POST', as: ended })).status).toBe(200)

    const list = await api('/api/me/sessions', { as: here })
    expect(list.status).toBe(200)
    expect(list.body).toHaveLength(2)
    const byId = Object.fromEntries(list.body.map((s: { id: string }) => [s.id, s]))
    expect(byId[hereId]).toMatchObject({ device: 'Firefox on Linux', address: '127.0.0.1', current: true })
    expect(byId[phoneId]).toMatchObject({ device: 'Safari on iPhone', address: '127.0.0.1', current: false })
    expect(Date.parse(byId[phoneId].lastSeenAt)).toBeGreaterThan(Date.now() - 60_000)

    // Nobody else can see or end my sessions.
    const stranger = await signIn(await makeMember())
    expect((await api('/api/me/sessions', { as: stranger })).body).toHaveLength(1)
    expect((await api(`/api/me/sessions/${phoneId}`, { method: 'DELETE', as: stranger })).status).toBe(404)
    expect((await api('/api/me/standing', { as: phone })).status).toBe(200)

    expect((await api(`/api/me/sessions/${phoneId}`, { method: 'DELETE', as: here })).status).toBe(200)
    await expectEnded(phone)
    expect((await api('/api/me/standing', { as: here })).status).toBe(200)
    expect((await api(`/api/me/sessions/${phoneId}`, { method: 'DELETE', as: here })).status).toBe(404)
    expect((await api('/api/me/sessions', { as: here })).body.map((s: { id: string }) => s.id)).toEqual([hereId])
  })

  it('signs out everywhere else, keeping this session, only when confirmed', async () => {
    const m = await makeMember()
    const here = await signIn(m)
    const others = [await signIn(m, m.password, FIREFOX_LINUX), await signIn(m, m.password, SAFARI_IPHONE)]

    const unconfirmed = await api('/api/me/sessions/sign-out-others', { as: here, body: {} })
    expect(unconfirmed.status).toBe(400)
    for (const cookie of others) expect((await api('/api/me/standing', { as: cookie })).status).toBe(200)

    const res = await api('/api/me/sessions/sign-out-others', { as: here, body: { confirm: true } })
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ ended: 2 })
    for (const cookie of others) await expectEnded(cookie)
    expect((await api('/api/me/standing', { as: here })).status).toBe(200)
    expect((await api('/api/me/sessions', { as: here })).body).toHaveLength(1)
  })
})
