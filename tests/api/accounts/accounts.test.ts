import { randomUUID } from 'node:crypto'
import pg from 'pg'
import { describe, it, expect, inject } from 'vitest'
import { api, sessionCookieOf } from '../../support/http'
import { linkIn, mailsTo, waitForMail, type CaughtMail } from '../../support/mail'
import { sql } from '../../support/db'
import { ago, clubDay, makeMember, setActionToken, tokenHash as hashOf, FACTORY_PASSWORD } from '../../support/factories'
import { postFrom } from '../../support/from-address'
import { testEnv } from '../../support/test-env'

// Sign-up, e-mail verification, sign-in/out, password reset and guardian consent against the shared
// server. Every test makes its own people (unique e-mails) and looks only at what it made.

const VERIFY_SUBJECT = /^Confirm your e-mail/
const RESET_SUBJECT = /^Reset your .* password/
const CONSENT_SUBJECT = /asks for your consent/
// Failed sign-ins here come from an address of their own, so they never spend 127.0.0.1's allowance.
const LOGIN_ADDRESS = '127.0.0.31'

const uniqueEmail = (label: string) => `${label}-${randomUUID().slice(0, 8)}@test.hoopwise.example`
const adultSignup = (email: string) => ({ name: 'Nell Tidewater', email, password: 'a-long-password-1', birthDate: clubDay(-30 * 365) })
const juniorSignup = (email: string) => ({ ...adultSignup(email), name: 'Pip Tidewater', birthDate: clubDay(-14 * 365) })
const tokenOf = (link: URL) => link.searchParams.get('token')!

async function userRows(email: string) {
  return sql<{ id: string, email_verified_at: Date | null, password_hash: string }>(
    'SELECT id, email_verified_at, password_hash FROM users WHERE lower(email) = lower($1)', [email])
}

async function expireToken(token: string) {
  expect(await setActionToken({ token }, { expiresAt: ago('1 minute') })).toHaveLength(1)
}

/** Waits until `count` messages to `address` match `subject`; returns them oldest first. */
async function waitForMails(address: string, subject: RegExp, count: number): Promise<CaughtMail[]> {
  const deadline = Date.now() + 15_000
  for (;;) {
    const found = (await mailsTo(address)).filter(m => subject.test(m.subject))
    if (found.length >= count || Date.now() > deadline) return found
    await new Promise(r => setTimeout(r, 200))
  }
}

function login(email: string, password: string) {
  return postFrom(LOGIN_ADDRESS, inject('baseUrl'), '/api/auth/login', { email, password })
}

/** How many password resets account `userId` has had (each one is audited once). */
async function resetsOf(userId: string): Promise<number> {
  const [row] = await sql<{ n: number }>(`SELECT count(*)::int AS n FROM audit_events WHERE action = 'account.password_reset' AND subject_id = $1`, [userId])
  return row!.n
}

/** Signs `email` in from the shared address and returns the session cookie. */
async function cookieFor(email: string, password: string): Promise<string> {
  const res = await api('/api/auth/login', { body: { email, password } })
  expect(res.status).toBe(200)
  return sessionCookieOf(res)
}

/** Resets `email`'s password through the e-mailed link. */
async function resetThroughLink(email: string, password: string): Promise<void> {
  expect((await api('/api/auth/password-reset-request', { body: { email } })).status).toBe(200)
  const token = tokenOf(linkIn(await waitForMail(email, RESET_SUBJECT), '/reset-password'))
  expect((await api('/api/auth/password-reset', { body: { token, password } })).status).toBe(200)
}

/**
 * Holds `FOR UPDATE` on the account's row in a transaction of its own until the returned function is
 * called: queuing a link for that account (an insert referring to the row) waits meanwhile.
 */
async function lockAccountRow(userId: string): Promise<() => Promise<void>> {
  const client = new pg.Client({ connectionString: testEnv.databaseUrl })
  await client.connect()
  await client.query('BEGIN')
  await client.query('SELECT id FROM users WHERE id = $1 FOR UPDATE', [userId])
  return async () => {
    await client.query('ROLLBACK')
    await client.end()
  }
}

/** Waits until `check` returns something truthy (15 s at most) and returns it. */
async function eventually<T>(check: () => Promise<T | null | undefined | false>): Promise<T> {
  const deadline = Date.now() + 15_000
  for (;;) {
    const value = await check()
    if (value) return value
    if (Date.now() > deadline) throw new Error('condition not met within 15 s')
    await new Promise(r => setTimeout(r, 200))
  }
}

/** `promise`'s value, or 'timed out' when it takes longer than `ms`. */
function within<T>(promise: Promise<T>, ms: number): Promise<T | 'timed out'> {
  let timer: NodeJS.Timeout | undefined
  const timeout = new Promise<'timed out'>((resolve) => {
    timer = setTimeout(() => resolve('timed out'), ms)
  })
  return Promise.race([promise, timeout]).finally(() => clearTimeout(timer))
}

describe('sign-up and e-mail verification', () => {
  it('creates an account, a pending membership and a session; the e-mailed link verifies once', async () => {
    const email = uniqueEmail('signup')
    const res = await api('/api/auth/signup', { body: adultSignup(email.toUpperCase()) })
    expect(res.status).toBe(201)
    expect(res.body.user).toMatchObject({ email, name: 'Nell Tidewater', roles: ['member'] })
    expect(res.body.verificationSentTo).toBe(email)
    expect(res.body.guardianConsentSentTo).toBeNull()
    expect(JSON.stringify(res.body)).not.toMatch(/hash|password/i)

    const [membership] = await sql<{ id: string, approved_at: Date | null, paid_through: string | null, email_verified_at: Date | null, roles: string[] }>(`
      SELECT m.id, m.approved_at, m.paid_through, u.email_verified_at, m.roles FROM memberships m JOIN users u ON u.id = m.user_id
      WHERE u.email = $1`, [email])
    expect(membership).toMatchObject({ id: res.body.user.memberId, approved_at: null, paid_through: null, email_verified_at: null, roles: ['member'] })

    const cookie = sessionCookieOf(res)
    const session = await api('/api/_auth/session', { as: cookie })
    expect(session.body.user).toMatchObject({ memberId: membership!.id, email, roles: ['member'] })

    const mail = await waitForMail(email, VERIFY_SUBJECT)
    const link = linkIn(mail, '/verify-email')
    // Links use the club's public address (the test server's), never the request's host.
    expect(link.origin).toBe(new URL(inject('baseUrl')).origin)
    expect(mail.html).toContain(link.search.replace(/&/g, '&amp;'))

    // Once sent, the stored notice keeps no usable link: the token is blanked in both bodies.
    const notice = await eventually(async () => (await sql<{ status: string, text_body: string, html_body: string }>(
      `SELECT status, text_body, html_body FROM notices WHERE membership_id = $1 AND kind = 'email_verification'`, [membership!.id]))
      .find(n => n.status === 'sent'))
    for (const body of [notice.text_body, notice.html_body]) {
      expect(body).not.toContain(tokenOf(link))
      expect(body).toContain('/verify-email?token=removed')
    }

    const first = await api('/api/auth/verify-email', { body: { token: tokenOf(link) } })
    expect(first.status).toBe(200)
    expect(first.body).toEqual({ verified: true, email })
    expect((await userRows(email))[0]!.email_verified_at).not.toBeNull()

    const second = await api('/api/auth/verify-email', { body: { token: tokenOf(link) } })
    expect(second.status).toBe(422)
    expect(second.body.data.reasons[0].code).toBe('TOKEN_USED')
  })

  it('refuses an expired verification link and an unknown one, and leaves the e-mail unconfirmed', async () => {
    const email = uniqueEmail('expired')
    expect((await api('/api/auth/signup', { body: adultSignup(email) })).status).toBe(201)
    const token = tokenOf(linkIn(await waitForMail(email, VERIFY_SUBJECT), '/verify-email'))
    await expireToken(token)

    const expired = await api('/api/auth/verify-email', { body: { token } })
    expect(expired.status).toBe(422)
    expect(expired.body.data.reasons).toEqual([{ code: 'TOKEN_EXPIRED', message: expect.stringMatching(/expired/) }])
    const unknown = await api('/api/auth/verify-email', { body: { token: randomUUID().replace(/-/g, '') } })
    expect(unknown.status).toBe(422)
    expect(unknown.body.data.reasons[0].code).toBe('TOKEN_INVALID')
    expect((await userRows(email))[0]!.email_verified_at).toBeNull()
  })

  it('sends a signed-in, unverified member a new link; refuses a verified member and a visitor', async () => {
    const email = uniqueEmail('resend')
    const cookie = sessionCookieOf(await api('/api/auth/signup', { body: adultSignup(email) }))
    await waitForMail(email, VERIFY_SUBJECT)

    const resent = await api('/api/auth/resend-verification', { method: 'POST', as: cookie })
    expect(resent.status).toBe(200)
    const mails = await waitForMails(email, VERIFY_SUBJECT, 2)
    expect(mails).toHaveLength(2)
    const newest = tokenOf(linkIn(mails[1]!, '/verify-email'))
    expect(newest).not.toBe(tokenOf(linkIn(mails[0]!, '/verify-email')))
    expect((await api('/api/auth/verify-email', { body: { token: newest } })).status).toBe(200)

    const again = await api('/api/auth/resend-verification', { method: 'POST', as: cookie })
    expect(again.status).toBe(422)
    expect(again.body.data.reasons[0].code).toBe('EMAIL_ALREADY_VERIFIED')
    expect((await api('/api/auth/resend-verification', { method: 'POST' })).status).toBe(401)
  })

  it('keeps to five verification links an hour even when the requests come at once', async () => {
    const email = uniqueEmail('resend-burst')
    const signup = await api('/api/auth/signup', { body: adultSignup(email) })
    const cookie = sessionCookieOf(signup)
    const answers = await Promise.all(Array.from({ length: 8 }, () => api('/api/auth/resend-verification', { method: 'POST', as: cookie })))
    // The sign-up's link is the first of the five.
    expect(answers.map(a => a.status).sort()).toEqual([200, 200, 200, 200, 429, 429, 429, 429])
    const tokens = await sql(`SELECT id FROM action_tokens WHERE user_id = $1 AND purpose = 'verify_email'`, [signup.body.user.id])
    expect(tokens).toHaveLength(5)
  })

  it('answers 409 for an e-mail already in use in another case, and writes nothing', async () => {
    const existing = await makeMember()
    const tokensBefore = await sql('SELECT id FROM action_tokens WHERE user_id = $1', [existing.userId])
    const res = await api('/api/auth/signup', { body: adultSignup(existing.email.toUpperCase()) })
    expect(res.status).toBe(409)
    expect(res.body.message).toBe('An account with this e-mail already exists. Sign in, or reset your password.')
    expect(await userRows(existing.email)).toHaveLength(1)
    expect(await sql('SELECT id FROM memberships WHERE user_id = $1', [existing.userId])).toHaveLength(1)
    expect(await sql('SELECT id FROM action_tokens WHERE user_id = $1', [existing.userId])).toEqual(tokensBefore)
    expect(await sql('SELECT id FROM notices WHERE membership_id = $1', [existing.memberId])).toHaveLength(0)
    expect(res.headers.getSetCookie().some(c => c.startsWith('nuxt-session='))).toBe(false)
  })
})

describe('juniors and guardian consent', () => {
  it('needs the guardian fields for someone under 18 in the club\'s time zone, and writes nothing without them', async () => {
    const email = uniqueEmail('junior-missing')
    const res = await api('/api/auth/signup', { body: juniorSignup(email) })
    expect(res.status).toBe(400)
    expect(res.body.data.fields).toEqual({
      guardianName: 'Members under 18 name a parent or guardian',
      guardianEmail: 'Enter the guardian\'s e-mail: we ask them for consent',
    })
    expect(await userRows(email)).toHaveLength(0)
  })

  it('e-mails the guardian a consent link that shows the junior and club, and works once', async () => {
    const email = uniqueEmail('junior')
    const guardianEmail = uniqueEmail('guardian')
    const res = await api('/api/auth/signup', { body: { ...juniorSignup(email), guardianName: 'Rowan Tidewater', guardianEmail } })
    expect(res.status).toBe(201)
    expect(res.body.guardianConsentSentTo).toBe(guardianEmail)
    const memberId = res.body.user.memberId

    const mail = await waitForMail(guardianEmail, CONSENT_SUBJECT)
    expect(mail.text).toContain('Pip Tidewater')
    expect(mail.text).toContain('Hello Rowan Tidewater,')
    const token = tokenOf(linkIn(mail, '/guardian-consent'))

    const preview = await api('/api/guardian-consent/preview', { body: { token } })
    expect(preview.status).toBe(200)
    // The guardian is not signed in: the club's time zone comes with the answer, for the page's dates.
    const [club] = await sql<{ time_zone: string }>('SELECT time_zone FROM clubs WHERE name = $1', ['Saltmarsh Rocketry Guild'])
    expect(preview.body).toEqual({ memberName: 'Pip Tidewater', clubName: 'Saltmarsh Rocketry Guild', guardianName: 'Rowan Tidewater', consentedAt: null, timeZone: club!.time_zone })
    // Looking does not consent.
    expect((await sql('SELECT guardian_consent_at FROM memberships WHERE id = $1', [memberId]))[0]).toEqual({ guardian_consent_at: null })

    const consent = await api('/api/guardian-consent', { body: { token } })
    expect(consent.status).toBe(200)
    expect(consent.body.consentedAt).toEqual(expect.any(String))
    const [row] = await sql<{ guardian_consent_at: Date }>('SELECT guardian_consent_at FROM memberships WHERE id = $1', [memberId])
    expect(row!.guardian_consent_at).not.toBeNull()
    const audit = await sql<{ actor_name: string, reason: string, after: Record<string, unknown> }>(
      `SELECT actor_name, reason, after FROM audit_events WHERE subject_id = $1 AND action = 'member.guardian_consent'`, [memberId])
    expect(audit).toHaveLength(1)
    // The guardian acted, but who they are stays out of the trail (it can never be erased).
    expect(audit[0]!.actor_name).toBe('Guardian (e-mailed link)')
    expect(JSON.stringify(audit[0]).toLowerCase()).not.toContain(guardianEmail.toLowerCase())
    expect(JSON.stringify(audit[0])).not.toContain('Rowan Tidewater')

    const again = await api('/api/guardian-consent', { body: { token } })
    expect(again.status).toBe(422)
    expect(again.body.data.reasons[0].code).toBe('TOKEN_USED')
    expect((await api('/api/guardian-consent/preview', { body: { token } })).body.data.reasons[0].code).toBe('TOKEN_USED')
  })

  it('refuses an expired consent link', async () => {
    const email = uniqueEmail('junior-late')
    const guardianEmail = uniqueEmail('guardian-late')
    const res = await api('/api/auth/signup', { body: { ...juniorSignup(email), guardianName: 'Sam Tidewater', guardianEmail } })
    expect(res.status).toBe(201)
    const token = tokenOf(linkIn(await waitForMail(guardianEmail, CONSENT_SUBJECT), '/guardian-consent'))
    await expireToken(token)
    const late = await api('/api/guardian-consent', { body: { token } })
    expect(late.status).toBe(422)
    expect(late.body.data.reasons[0].code).toBe('TOKEN_EXPIRED')
    expect((await sql('SELECT guardian_consent_at FROM memberships WHERE id = $1', [res.body.user.memberId]))[0]).toEqual({ guardian_consent_at: null })
  })
})

describe('sign-in and sign-out', () => {
  it('signs in, shows the session user, and signs out', async () => {
    const member = await makeMember({ roles: ['instructor'] })
    const res = await login(member.email.toUpperCase(), FACTORY_PASSWORD)
    expect(res.status).toBe(200)
    expect(res.body.user).toMatchObject({ id: member.userId, memberId: member.memberId, email: member.email, roles: ['member', 'instructor'] })

    const signedIn = await api('/api/auth/login', { body: { email: member.email, password: FACTORY_PASSWORD } })
    const cookie = sessionCookieOf(signedIn)
    const session = await api('/api/_auth/session', { as: cookie })
    expect(session.body.user).toEqual({
      id: member.userId, memberId: member.memberId, name: member.name, email: member.email,
      clubId: expect.any(String), roles: ['member', 'instructor'],
    })

    const out = await api('/api/auth/logout', { method: 'POST', as: cookie })
    expect(out.status).toBe(200)
    const cleared = out.headers.getSetCookie().find(c => c.startsWith('nuxt-session='))
    expect(cleared).toMatch(/^nuxt-session=;/)
    // The browser now holds the cleared cookie: the session has no user.
    const after = await api('/api/_auth/session', { as: sessionCookieOf(out) })
    expect(after.status).toBe(200)
    expect(after.body?.user).toBeUndefined()
  })

  it('answers a wrong password and an unknown e-mail with the same 401', async () => {
    const member = await makeMember()
    const wrong = await login(member.email, 'not-the-password-1')
    const unknown = await login(uniqueEmail('nobody'), 'not-the-password-1')
    expect(wrong.status).toBe(401)
    expect(unknown.status).toBe(401)
    expect(wrong.body.message).toBe('E-mail or password is wrong')
    expect(unknown.body.message).toBe(wrong.body.message)
  })
})

describe('password reset', () => {
  const RESET_BODY = {
    ok: true,
    message: 'If an account uses this e-mail, a link to choose a new password is on its way. It works once and expires in 1 hour.',
  }

  it('answers an unknown e-mail exactly as a known one, and sends it nothing', async () => {
    const nobody = uniqueEmail('nobody')
    const member = await makeMember()
    const unknown = await api('/api/auth/password-reset-request', { body: { email: nobody } })
    const known = await api('/api/auth/password-reset-request', { body: { email: member.email } })
    expect(unknown.status).toBe(200)
    expect(known.status).toBe(200)
    expect(unknown.body).toEqual(RESET_BODY)
    expect(known.body).toEqual(unknown.body)
    await waitForMail(member.email, RESET_SUBJECT)
    expect(await mailsTo(nobody)).toHaveLength(0)
    expect(await sql('SELECT id FROM notices WHERE lower(to_email) = $1', [nobody])).toHaveLength(0)
  })

  it('resets the password once from the e-mailed link and stops the other reset links', async () => {
    const member = await makeMember()
    expect((await api('/api/auth/password-reset-request', { body: { email: member.email.toUpperCase() } })).status).toBe(200)
    expect((await api('/api/auth/password-reset-request', { body: { email: member.email } })).status).toBe(200)
    const mails = await waitForMails(member.email, RESET_SUBJECT, 2)
    expect(mails).toHaveLength(2)
    const [older, newer] = mails.map(m => tokenOf(linkIn(m, '/reset-password')))
    const newPassword = 'a-brand-new-password-7'

    const reset = await api('/api/auth/password-reset', { body: { token: newer, password: newPassword } })
    expect(reset.status).toBe(200)
    expect((await login(member.email, FACTORY_PASSWORD)).status).toBe(401)
    expect((await login(member.email, newPassword)).status).toBe(200)

    const reused = await api('/api/auth/password-reset', { body: { token: newer, password: 'yet-another-password-8' } })
    expect(reused.status).toBe(422)
    expect(reused.body.data.reasons[0].code).toBe('TOKEN_USED')
    const stale = await api('/api/auth/password-reset', { body: { token: older, password: 'yet-another-password-8' } })
    expect(stale.status).toBe(422)
    expect(stale.body.data.reasons[0].code).toBe('TOKEN_USED')
    expect((await login(member.email, newPassword)).status).toBe(200)

    const audit = await sql<{ actor_membership_id: string }>(
      `SELECT actor_membership_id FROM audit_events WHERE subject_id = $1 AND action = 'account.password_reset'`, [member.userId])
    expect(audit).toEqual([{ actor_membership_id: member.memberId }])
  })

  it('answers a known e-mail before its link is queued, as fast as an unknown one', async () => {
    const member = await makeMember()
    // While the account's row is locked, queuing its link waits; the reply must not.
    const release = await lockAccountRow(member.userId)
    try {
      const known = await within(api('/api/auth/password-reset-request', { body: { email: member.email } }), 5_000)
      const unknown = await within(api('/api/auth/password-reset-request', { body: { email: uniqueEmail('nobody') } }), 5_000)
      expect(known).not.toBe('timed out')
      expect(unknown).not.toBe('timed out')
      expect(known).toMatchObject({ status: 200, body: RESET_BODY })
      expect(unknown).toMatchObject({ status: 200, body: RESET_BODY })
      expect(await sql('SELECT id FROM action_tokens WHERE user_id = $1', [member.userId])).toHaveLength(0)
    }
    finally {
      await release()
    }
    // Once the row is free the work finishes after the reply: the link arrives.
    const mail = await waitForMail(member.email, RESET_SUBJECT)
    expect(linkIn(mail, '/reset-password').searchParams.get('token')).toMatch(/^[A-Za-z0-9_-]{20,}$/)
  })

  it('ends every session begun before a reset; sessions begun after it (and their profile edits) work', async () => {
    const member = await makeMember()
    const before = await cookieFor(member.email, FACTORY_PASSWORD)
    const renamed = await api('/api/me/profile', {
      method: 'PATCH', as: before, body: { name: 'Renamed Before Reset', phone: null, emergencyContactName: null, emergencyContactPhone: null, unitPreference: 'bar' },
    })
    expect(renamed.status).toBe(200)
    const renamedCookie = sessionCookieOf(renamed)
    expect((await api('/api/me/standing', { as: before })).status).toBe(200)
    expect((await api('/api/me/standing', { as: renamedCookie })).status).toBe(200)

    const newPassword = 'a-password-after-reset-3'
    await resetThroughLink(member.email, newPassword)
    for (const stale of [before, renamedCookie]) {
      const res = await api('/api/me/standing', { as: stale })
      expect(res.status).toBe(401)
      expect(res.headers.getSetCookie().find(c => c.startsWith('nuxt-session='))).toMatch(/^nuxt-session=;/)
      // The session endpoint (which the server-rendered page reads too) shows no user either.
      const shown = await api('/api/_auth/session', { as: stale })
      expect(shown.status).toBe(401)
      expect(shown.body.user).toBeUndefined()
      expect(shown.headers.getSetCookie().find(c => c.startsWith('nuxt-session='))).toMatch(/^nuxt-session=;/)
    }

    // A session begun after the reset works, and keeps working after the profile rewrites it.
    const after = await cookieFor(member.email, newPassword)
    const session = await api('/api/_auth/session', { as: after })
    expect(Object.keys(session.body.user).sort()).toEqual(['clubId', 'email', 'id', 'memberId', 'name', 'roles'])
    expect(session.body.secure).toBeUndefined()
    const edited = await api('/api/me/profile', {
      method: 'PATCH', as: after, body: { name: 'Renamed After Reset', phone: null, emergencyContactName: null, emergencyContactPhone: null, unitPreference: 'psi' },
    })
    expect(edited.status).toBe(200)
    const me = await api('/api/me/standing', { as: sessionCookieOf(edited) })
    expect(me.status).toBe(200)
    expect((await api('/api/_auth/session', { as: sessionCookieOf(edited) })).body.user.name).toBe('Renamed After Reset')
  })

  it('lets exactly one of several racing resets with the same link through', async () => {
    const member = await makeMember()
    await api('/api/auth/password-reset-request', { body: { email: member.email } })
    const token = tokenOf(linkIn(await waitForMail(member.email, RESET_SUBJECT), '/reset-password'))
    const passwords = Array.from({ length: 5 }, (_, i) => `racing-password-${i}-long`)
    const answers = await Promise.all(passwords.map(password => api('/api/auth/password-reset', { body: { token, password } })))
    const won = answers.flatMap((a, i) => (a.status === 200 ? [passwords[i]!] : []))
    expect(won).toHaveLength(1)
    for (const a of answers.filter(a => a.status !== 200)) {
      expect(a.status).toBe(422)
      expect(a.body.data.reasons[0].code).toBe('TOKEN_USED')
    }
    expect((await login(member.email, won[0]!)).status).toBe(200)
    expect(await resetsOf(member.userId)).toBe(1)
  })

  it('two reset links of one account used at once: one sets the password, the other is refused, never a 500', async () => {
    const members = await Promise.all([1, 2, 3].map(() => makeMember()))
    await Promise.all(members.map(async (member) => {
      for (let i = 0; i < 2; i++) expect((await api('/api/auth/password-reset-request', { body: { email: member.email } })).status).toBe(200)
      const tokens = (await waitForMails(member.email, RESET_SUBJECT, 2)).map(m => tokenOf(linkIn(m, '/reset-password')))
      expect(tokens).toHaveLength(2)
      const passwords = ['parallel-password-one-1', 'parallel-password-two-2']
      const answers = await Promise.all(tokens.map((token, i) => api('/api/auth/password-reset', { body: { token, password: passwords[i] } })))
      const statuses = answers.map(a => a.status)
      expect(statuses.filter(s => s === 200)).toHaveLength(1)
      const loser = answers.find(a => a.status !== 200)!
      expect([409, 422]).toContain(loser.status)
      const won = passwords[statuses.indexOf(200)]!
      expect((await login(member.email, won)).status).toBe(200)
      expect(await resetsOf(member.userId)).toBe(1)
    }))
  })

  it('refuses an expired reset link and keeps the old password', async () => {
    const member = await makeMember()
    await api('/api/auth/password-reset-request', { body: { email: member.email } })
    const token = tokenOf(linkIn(await waitForMail(member.email, RESET_SUBJECT), '/reset-password'))
    await expireToken(token)
    const res = await api('/api/auth/password-reset', { body: { token, password: 'too-late-password-9' } })
    expect(res.status).toBe(422)
    expect(res.body.data.reasons[0].code).toBe('TOKEN_EXPIRED')
    expect((await login(member.email, FACTORY_PASSWORD)).status).toBe(200)
  })
})

describe('bad input on every account write route', () => {
  const longText = 'x'.repeat(5000)
  const goodToken = 'a'.repeat(43)
  const cases: [string, string, unknown][] = [
    ['/api/auth/signup', 'truncated JSON', '{"name": "half'],
    ['/api/auth/signup', 'plain text', 'plain words, not JSON'],
    ['/api/auth/signup', 'wrong types', { name: 42, email: ['a@b.example'], password: true, birthDate: 19900101 }],
    ['/api/auth/signup', 'a 5000-character name', { ...adultSignup('long@test.hoopwise.example'), name: longText }],
    ['/api/auth/signup', 'a 320-character e-mail', { ...adultSignup(`${'l'.repeat(300)}@test.hoopwise.example`) }],
    ['/api/auth/signup', 'a 5000-character password', { ...adultSignup('longpw@test.hoopwise.example'), password: longText }],
    ['/api/auth/signup', 'no fields', {}],
    ['/api/auth/verify-email', 'truncated JSON', '{"token":'],
    ['/api/auth/verify-email', 'a number for the token', { token: 12345 }],
    ['/api/auth/verify-email', 'a 5000-character token', { token: longText }],
    ['/api/auth/verify-email', 'a token with SQL in it', { token: `${goodToken}'; DROP TABLE users; --` }],
    ['/api/auth/password-reset-request', 'truncated JSON', '{"email"'],
    ['/api/auth/password-reset-request', 'an object for the e-mail', { email: { $ne: null } }],
    ['/api/auth/password-reset-request', 'a 5000-character e-mail', { email: `${longText}@x.io` }],
    ['/api/auth/password-reset', 'truncated JSON', '[1, 2'],
    ['/api/auth/password-reset', 'a number for the password', { token: goodToken, password: 12 }],
    ['/api/auth/password-reset', 'a 5000-character password', { token: goodToken, password: longText }],
    ['/api/auth/password-reset', 'a 5000-character token', { token: longText, password: 'long-enough-password' }],
    ['/api/guardian-consent/preview', 'truncated JSON', '{'],
    ['/api/guardian-consent/preview', 'a null token', { token: null }],
    ['/api/guardian-consent', 'a form-encoded body', 'token=abc'],
    ['/api/guardian-consent', 'an array for the token', { token: ['a'.repeat(43)] }],
    ['/api/guardian-consent', 'a 5000-character token', { token: longText }],
  ]

  it.each(cases)('%s with %s → 400 with a message', async (path, _what, body) => {
    const res = await api(path, { body })
    expect(res.status).toBe(400)
    expect(res.body.message).toEqual(expect.any(String))
    expect(res.body.message.length).toBeGreaterThan(0)
  })

  it('writes nothing for a refused sign-up or password reset', async () => {
    const email = uniqueEmail('bad')
    for (const body of [{ ...adultSignup(email), name: longText }, { ...adultSignup(email), password: 'short' }, { ...adultSignup(email), birthDate: '1990-02-30' }]) {
      expect((await api('/api/auth/signup', { body })).status).toBe(400)
    }
    expect(await userRows(email)).toHaveLength(0)

    const member = await makeMember()
    const [before] = await userRows(member.email)
    await api('/api/auth/password-reset-request', { body: { email: member.email } })
    const token = tokenOf(linkIn(await waitForMail(member.email, RESET_SUBJECT), '/reset-password'))
    for (const password of [12, 'short', longText]) {
      expect((await api('/api/auth/password-reset', { body: { token, password } })).status).toBe(400)
    }
    expect((await userRows(member.email))[0]!.password_hash).toBe(before!.password_hash)
    // The link survived the refused attempts: it is still unused.
    expect((await sql('SELECT used_at FROM action_tokens WHERE token_hash = $1', [hashOf(token)]))[0]).toEqual({ used_at: null })
  })
})
