import { randomUUID } from 'node:crypto'
import { describe, it, expect, beforeAll, inject } from 'vitest'
import { api } from '../../support/http'
import { linkIn, mailsTo, waitForMail } from '../../support/mail'
import { sql } from '../../support/db'
import { clubDay, makeClub, makeMember, type MadeMember } from '../../support/factories'
import { signIn } from '../../support/global-setup'
import { postFrom } from '../../support/from-address'
import { emailKey } from '../../../server/services/accounts/sign-in-limits'

// Imported accounts have no password: they cannot sign in (refused exactly like a wrong password)
// until their member follows the welcome link the admin chose to send, once, through the notice queue.

const WELCOME_SUBJECT = /^Welcome to .* on Hoopwise/
// An address of this file's own, so the per-address sign-in limits of other files are not spent.
const login = (email: string, password: string) => postFrom('127.0.0.212', inject('baseUrl'), '/api/auth/login', { email, password })
const failuresOf = async (email: string) =>
  (await sql<{ points: number }>('SELECT points FROM rate_limits WHERE key = $1', [`login-account:${emailKey(email)}`]))[0]?.points ?? 0
const welcomeNotices = async (memberId: string) =>
  (await sql<{ n: number }>(`SELECT count(*)::int AS n FROM notices WHERE membership_id = $1 AND kind = 'welcome'`, [memberId]))[0]!.n

describe('an account without a password', () => {
  it('is refused like a wrong password: same 401 and words, counted by the limiter, and it takes the hashing time', async () => {
    const imported = await makeMember({ passwordHash: null })
    const normal = await makeMember()
    const timed = async (email: string) => {
      const start = performance.now()
      const res = await login(email, 'any-password-at-all-1')
      return { res, ms: performance.now() - start }
    }
    const none = await timed(imported.email)
    const wrong = await timed(normal.email)
    expect(none.res.status).toBe(401)
    expect(wrong.res.status).toBe(401)
    expect(none.res.body.message).toBe(wrong.res.body.message)
    expect(none.res.body.message).toBe('E-mail or password is wrong')
    expect(await failuresOf(imported.email)).toBe(1)
    expect(await failuresOf(normal.email)).toBe(1)
    // A password check (scrypt) takes a good part of a second; a refusal that skipped it would answer
    // in a few milliseconds. Loose bounds, as the machine may be busy.
    expect(none.ms).toBeGreaterThan(wrong.ms * 0.3)
    // An empty password is no key to it either.
    expect((await login(imported.email, '')).status).toBeGreaterThanOrEqual(400)
  })

  it('can still ask for a reset link and set a password with it', async () => {
    const imported = await makeMember({ passwordHash: null })
    expect((await api('/api/auth/password-reset-request', { body: { email: imported.email } })).status).toBe(200)
    const token = linkIn(await waitForMail(imported.email, /^Reset your .* password/), '/reset-password').searchParams.get('token')!
    expect((await api('/api/auth/password-reset', { body: { token, password: 'chosen-after-import-77' } })).status).toBe(200)
    expect((await login(imported.email, 'chosen-after-import-77')).status).toBe(200)
  })
})

describe('send the welcome', () => {
  let clubId: string
  let admin: string
  let imported: MadeMember[]
  let withPassword: MadeMember
  let resigned: MadeMember

  beforeAll(async () => {
    ;({ id: clubId } = await makeClub({ name: `Welcome Club ${randomUUID().slice(0, 6)}`, tagPrefix: 'WLC' }))
    const a = await makeMember({ clubId, roles: ['admin'] })
    admin = await signIn(inject('baseUrl'), a.email, a.password)
    imported = [await makeMember({ clubId, passwordHash: null }), await makeMember({ clubId, passwordHash: null })]
    withPassword = await makeMember({ clubId })
    resigned = await makeMember({ clubId, passwordHash: null, resigned: true })
  })

  it('needs members.manage and a confirmation', async () => {
    expect((await api('/api/members/welcome', { as: 'member', body: { confirm: true } })).status).toBe(403)
    expect((await api('/api/members/welcome', { as: admin, body: {} })).status).toBe(400)
    expect(await welcomeNotices(imported[0]!.memberId)).toBe(0)
  })

  it('e-mails each imported member once, with a link that sets the password; pressing again sends nothing', async () => {
    expect((await api('/api/members/welcome', { as: admin })).body).toEqual({ waiting: 2 })
    const first = await api('/api/members/welcome', { as: admin, body: { confirm: true } })
    expect(first.status, JSON.stringify(first.body)).toBe(200)
    expect(first.body).toEqual({ queued: 2, waiting: 0 })

    const member = imported[0]!
    const mail = await waitForMail(member.email, WELCOME_SUBJECT)
    expect(mail.text).toContain(member.name)
    expect(mail.text).toMatch(/expires in 14 days/)
    await waitForMail(imported[1]!.email, WELCOME_SUBJECT)
    const token = linkIn(mail, '/reset-password').searchParams.get('token')!

    const again = await api('/api/members/welcome', { as: admin, body: { confirm: true } })
    expect(again.body).toEqual({ queued: 0, waiting: 0 })
    for (const m of imported) expect(await welcomeNotices(m.memberId)).toBe(1)
    expect(await welcomeNotices(withPassword.memberId)).toBe(0)
    expect(await welcomeNotices(resigned.memberId)).toBe(0)
    expect((await mailsTo(withPassword.email))).toHaveLength(0)

    expect((await login(member.email, 'my-first-own-password-9')).status).toBe(401)
    const set = await api('/api/auth/password-reset', { body: { token, password: 'my-first-own-password-9' } })
    expect(set.status, JSON.stringify(set.body)).toBe(200)
    expect((await login(member.email, 'my-first-own-password-9')).status).toBe(200)
    // The link works once.
    expect((await api('/api/auth/password-reset', { body: { token, password: 'another-password-10' } })).status).toBe(422)

    const [audit] = await sql<{ n: number }>(`SELECT count(*)::int AS n FROM audit_events WHERE club_id = $1 AND action = 'member.welcome'`, [clubId])
    expect(audit!.n).toBe(1)
  })

  it('welcomes a member imported later, and only them', async () => {
    const late = await makeMember({ clubId, passwordHash: null })
    const res = await api('/api/members/welcome', { as: admin, body: { confirm: true } })
    expect(res.body).toEqual({ queued: 1, waiting: 0 })
    await waitForMail(late.email, WELCOME_SUBJECT)
    for (const m of imported) expect(await welcomeNotices(m.memberId)).toBe(1)
  })
})

describe('before the welcome', () => {
  // A club of its own: a welcome press reaches every imported member of the club it is pressed in.
  let clubId: string
  let admin: string
  let plan: string
  beforeAll(async () => {
    ;({ id: clubId } = await makeClub({ name: `Quiet Club ${randomUUID().slice(0, 6)}`, tagPrefix: 'QUI' }))
    const a = await makeMember({ clubId, roles: ['admin'] })
    admin = await signIn(inject('baseUrl'), a.email, a.password)
    const [row] = await sql<{ id: string }>(`SELECT id FROM dues_plans WHERE club_id = $1 AND audience = 'adult' ORDER BY code LIMIT 1`, [clubId])
    plan = row!.id
  })
  const noticesOf = async (memberId: string, kind: string) =>
    (await sql<{ n: number }>('SELECT count(*)::int AS n FROM notices WHERE membership_id = $1 AND kind = $2', [memberId, kind]))[0]!.n
  const cashPayment = (memberId: string, reference: string) => api('/api/dues/payments', {
    as: admin,
    body: { memberId, planId: plan, method: 'cash', amountMinor: 6000, paidOn: clubDay(-1), reference },
  })

  it('the club e-mails an imported member nothing until the welcome is sent, then as anyone', async () => {
    const m = await makeMember({ clubId, passwordHash: null })
    expect((await cashPayment(m.memberId, 'Before the welcome')).status).toBe(200)
    expect(await noticesOf(m.memberId, 'payment_receipt')).toBe(0)
    expect((await api('/api/members/welcome', { as: admin, body: { confirm: true } })).status).toBe(200)
    expect(await welcomeNotices(m.memberId)).toBe(1)
    expect((await cashPayment(m.memberId, 'After the welcome')).status).toBe(200)
    expect(await noticesOf(m.memberId, 'payment_receipt')).toBe(1)
  })
})
