import { describe, it, expect, inject } from 'vitest'
import { api } from '../support/http'
import { sql } from '../support/db'
import { makeMember } from '../support/factories'
import { testEnv } from '../support/test-env'
import { deriveOptOutKey, optOutToken } from '../../server/services/notices/opt-out'

// The request guard (server/middleware/0.request-guard.ts) and the headers every answer carries.
const WRONG_SIGN_IN = JSON.stringify({ email: 'nobody-guard@test.hoopwise.example', password: 'not-the-password-1' })

describe('media types of state-changing requests', () => {
  it('refuses a JSON body sent as text/plain with 415 (the form-post trick), on a route that takes JSON', async () => {
    const res = await api('/api/auth/login', { body: WRONG_SIGN_IN, headers: { 'content-type': 'text/plain' } })
    expect(res.status).toBe(415)
    expect(res.body.message).toBe('The body must be application/json')
  })

  it.each([['text/plain;charset=UTF-8'], ['application/x-www-form-urlencoded'], ['multipart/form-data; boundary=x']])('refuses %s on a signed-in write (415)', async (type) => {
    const res = await api('/api/me/profile', { method: 'PATCH', as: 'member', body: '{"phone":"0123"}', headers: { 'content-type': type } })
    expect(res.status).toBe(415)
  })

  it('refuses a body without any content type (415)', async () => {
    const res = await fetch(new URL('/api/auth/login', inject('baseUrl')), { method: 'POST', body: new Blob([WRONG_SIGN_IN]) })
    expect(res.status).toBe(415)
  })

  it('compares the media type without its parameters and case: "Application/JSON; charset=utf-8" is JSON', async () => {
    const res = await api('/api/auth/login', { body: WRONG_SIGN_IN, headers: { 'content-type': 'Application/JSON; charset=utf-8' } })
    expect(res.status).toBe(401)
  })

  it('takes a body-less POST without a content type (sign-out)', async () => {
    expect((await api('/api/auth/logout', { method: 'POST' })).status).toBe(200)
  })

  it('lets the one-click opt-out take the form-encoded body of RFC 8058, from a mail program on another site', async () => {
    const member = await makeMember()
    const token = optOutToken(deriveOptOutKey(testEnv.sessionPassword), member.memberId, 'dues_reminder')
    const res = await api('/api/notices/opt-out', {
      method: 'POST',
      query: { token },
      body: 'List-Unsubscribe=One-Click',
      headers: { 'content-type': 'application/x-www-form-urlencoded', 'origin': 'https://webmail.example', 'sec-fetch-site': 'cross-site' },
    })
    expect(res.status).toBe(200)
    const [m] = await sql<{ notice_opt_outs: string[] }>('SELECT notice_opt_outs FROM memberships WHERE id = $1', [member.memberId])
    expect(m!.notice_opt_outs).toEqual(['dues_reminder'])
  })
})

describe('requests from other sites', () => {
  it.each([
    ['an Origin of another site', { origin: 'https://evil.example' }],
    ['Origin "null" (a sandboxed frame)', { origin: 'null' }],
    ['Sec-Fetch-Site: cross-site', { 'sec-fetch-site': 'cross-site' }],
    ['Sec-Fetch-Site: same-site (a sibling subdomain)', { 'sec-fetch-site': 'same-site' }],
  ])('refuses a write carrying %s with 403 before the handler runs', async (_label, headers) => {
    const member = await makeMember()
    const before = await sql('SELECT phone FROM memberships WHERE id = $1', [member.memberId])
    const login = await api('/api/auth/login', { body: { email: member.email, password: member.password }, headers })
    expect(login.status).toBe(403)
    expect(login.headers.get('set-cookie')).toBeNull()
    const edit = await api('/api/me/profile', { method: 'PATCH', as: 'member', body: { phone: '0999 999' }, headers })
    expect(edit.status).toBe(403)
    expect(await sql('SELECT phone FROM memberships WHERE id = $1', [member.memberId])).toEqual(before)
  })

  it('takes writes from this site (its own Origin, Sec-Fetch-Site: same-origin) and from clients that send neither', async () => {
    const member = await makeMember()
    const body = { email: member.email, password: member.password }
    expect((await api('/api/auth/login', { body, headers: { 'origin': inject('baseUrl'), 'sec-fetch-site': 'same-origin' } })).status).toBe(200)
    expect((await api('/api/auth/login', { body })).status).toBe(200)
  })

  it('still lets another site read nothing and change nothing: GETs are not refused, writes are', async () => {
    expect((await api('/api/health', { headers: { origin: 'https://evil.example' } })).status).toBe(200)
  })
})

describe('security headers', () => {
  it('sends a page with a nonce-based script policy that its own scripts carry, and no inline-script allowance', async () => {
    const res = await fetch(new URL('/login', inject('baseUrl')))
    expect(res.status).toBe(200)
    const csp = res.headers.get('content-security-policy') ?? ''
    const scriptSrc = csp.split(';').map(d => d.trim()).find(d => d.startsWith('script-src '))!
    const nonce = scriptSrc.match(/'nonce-([^']+)'/)?.[1]
    expect(nonce).toBeTruthy()
    expect(scriptSrc).not.toContain('unsafe-inline')
    expect(csp).toContain('frame-ancestors \'none\'')
    expect(csp).toContain('object-src \'none\'')
    const html = await res.text()
    const scripts = [...html.matchAll(/<script\b[^>]*>/g)].map(m => m[0]).filter(tag => !/type="application\/json"/.test(tag))
    expect(scripts.length).toBeGreaterThan(0)
    for (const tag of scripts) expect(tag).toContain(`nonce="${nonce}"`)
    // A fresh nonce for every answer.
    const again = (await fetch(new URL('/login', inject('baseUrl')))).headers.get('content-security-policy')
    expect(again).not.toContain(`'nonce-${nonce}'`)
  })

  it.each(['/login', '/api/health'])('%s carries nosniff, a referrer policy and DENY framing, and no HSTS over http', async (path) => {
    const res = await fetch(new URL(path, inject('baseUrl')))
    expect(res.headers.get('x-content-type-options')).toBe('nosniff')
    expect(res.headers.get('referrer-policy')).toBe('same-origin')
    expect(res.headers.get('x-frame-options')).toBe('DENY')
    // The test server's public address is http: no HSTS (tests/api/bounded-bodies.test.ts checks https).
    expect(res.headers.get('strict-transport-security')).toBeNull()
    expect(res.headers.get('x-powered-by')).toBeNull()
  })

  it('gives pages a permissions policy that allows the camera for this site only', async () => {
    const permissions = (await fetch(new URL('/login', inject('baseUrl')))).headers.get('permissions-policy') ?? ''
    expect(permissions.split(/,\s*/)).toEqual(expect.arrayContaining(['camera=(self)', 'microphone=()', 'geolocation=()']))
  })

  it('marks API answers with personal data no-store, errors included', async () => {
    const me = await api('/api/me/standing', { as: 'member' })
    expect(me.status).toBe(200)
    expect(me.headers.get('cache-control')).toBe('no-store')
    const anonymous = await api('/api/me/standing')
    expect(anonymous.status).toBe(401)
    expect(anonymous.headers.get('cache-control')).toBe('no-store')
  })
})

describe('unknown API addresses', () => {
  it.each([
    ['GET', 'text/html,application/xhtml+xml'],
    ['GET', 'application/json'],
    ['DELETE', '*/*'],
  ])('%s with Accept %s answers a JSON 404, not the sign-in page', async (method, accept) => {
    const res = await fetch(new URL('/api/no-such-thing/at-all', inject('baseUrl')), { method, headers: { accept }, redirect: 'manual' })
    expect(res.status).toBe(404)
    expect(res.headers.get('content-type')).toMatch(/^application\/json/)
    expect(await res.json()).toMatchObject({ statusCode: 404, message: 'There is no such API address' })
  })

  it('leaves the real routes alone, the session route of the sign-in module included', async () => {
    expect((await api('/api/health')).status).toBe(200)
    expect((await api('/api/_auth/session')).status).toBe(200)
  })
})
