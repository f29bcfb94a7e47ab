import { randomUUID } from 'node:crypto'
import { beforeAll, describe, expect, it } from 'vitest'
import { api, sessionCookieOf } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makeClub, makeMember, NOW, setMembership, setUser, type MadeMember, type MemberOverrides } from '../../support/factories'
import type { CurrentWaiverDto, DashboardDto } from '../../../shared/types/dto'

// Accepting the waiver and being approved need a confirmed e-mail; approving a junior waits for the
// guardian's consent. Each test makes its own members and confirms or consents through SQL, as the
// e-mailed links would.

const approve = (id: string, as = 'admin') =>
  api(`/api/members/${id}/approve`, { method: 'POST', as, body: { reason: 'Known to the club' } })
const codesOf = (res: { body: { data?: { reasons?: { code: string }[] } } }) => res.body.data?.reasons?.map(r => r.code)
const approvedAt = async (id: string) => (await sql<{ approved_at: Date | null }>('SELECT approved_at FROM memberships WHERE id = $1', [id]))[0]!.approved_at
const approvalEvents = (id: string) => sql(`SELECT id FROM audit_events WHERE subject_id = $1 AND action = 'member.approve'`, [id])
const confirmEmail = (m: MadeMember) => setUser(m.userId, { emailVerifiedAt: NOW })
const giveConsent = (m: MadeMember) => setMembership(m.memberId, { guardianConsentAt: NOW })

const signUp = (o: MemberOverrides = {}) => makeMember({ approved: false, paidDays: null, ...o })
const junior = (o: MemberOverrides = {}) => signUp({
  birthDate: clubDay(-14 * 365),
  guardianName: 'Delphine Reedmere',
  guardianEmail: `guardian-${randomUUID().slice(0, 8)}@test.hoopwise.example`,
  ...o,
})

async function signInAs(m: MadeMember): Promise<string> {
  const res = await api('/api/auth/login', { body: { email: m.email, password: m.password } })
  expect(res.status).toBe(200)
  return sessionCookieOf(res)
}

describe('approving a sign-up', () => {
  it('is refused while the e-mail is unconfirmed, and goes through once it is confirmed', async () => {
    const m = await signUp({ verified: false })
    const refused = await approve(m.memberId)
    expect(refused.status).toBe(422)
    expect(codesOf(refused)).toEqual(['EMAIL_NOT_CONFIRMED'])
    expect(refused.body.data.reasons[0].message).toBe(`${m.name} has not confirmed their e-mail address yet; approval waits until they open the link we sent.`)
    expect(await approvedAt(m.memberId)).toBeNull()
    expect(await approvalEvents(m.memberId)).toHaveLength(0)

    await confirmEmail(m)
    expect((await approve(m.memberId)).status).toBe(200)
    expect(await approvedAt(m.memberId)).not.toBeNull()
  })

  it('of a junior waits for the guardian\'s consent, and goes through with it', async () => {
    const m = await junior()
    const refused = await approve(m.memberId)
    expect(refused.status).toBe(422)
    expect(codesOf(refused)).toEqual(['GUARDIAN_CONSENT_MISSING'])
    expect(refused.body.message).toContain('is under 18: approval waits for their parent or guardian to consent')
    expect(await approvedAt(m.memberId)).toBeNull()

    await giveConsent(m)
    const res = await approve(m.memberId)
    expect(res.status).toBe(200)
    expect(res.body.approvedAt).toBeTruthy()
  })

  it('of a junior with consent from the start goes through; both reasons are listed when both hold', async () => {
    const withConsent = await junior({ guardianConsent: true })
    expect((await approve(withConsent.memberId)).status).toBe(200)

    const neither = await junior({ verified: false })
    const refused = await approve(neither.memberId)
    expect(refused.status).toBe(422)
    expect(codesOf(refused)).toEqual(['EMAIL_NOT_CONFIRMED', 'GUARDIAN_CONSENT_MISSING'])
  })

  it('the member page\'s data says what the sign-up waits for', async () => {
    const m = await junior({ verified: false })
    const res = await api(`/api/members/${m.memberId}`, { as: 'admin' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ emailVerified: false, junior: true, guardianConsentAt: null, approvedAt: null })
  })
})

describe('accepting the waiver', () => {
  it('is refused while the e-mail is unconfirmed, and recorded once it is confirmed', async () => {
    const m = await makeMember({ verified: false, acceptWaiver: false })
    const cookie = await signInAs(m)
    const { waiver } = (await api<CurrentWaiverDto>('/api/waivers/current', { as: cookie })).body
    expect(waiver).not.toBeNull()
    const body = { version: waiver!.version, typedName: m.name }

    const refused = await api('/api/waivers/accept', { body, as: cookie })
    expect(refused.status).toBe(422)
    expect(codesOf(refused)).toEqual(['EMAIL_NOT_CONFIRMED'])
    expect(refused.body.message).toMatch(/^Confirm your e-mail address first/)
    expect(await sql('SELECT id FROM waiver_acceptances WHERE membership_id = $1', [m.memberId])).toHaveLength(0)

    await confirmEmail(m)
    const accepted = await api('/api/waivers/accept', { body, as: cookie })
    expect(accepted.status).toBe(200)
    expect(await sql('SELECT id FROM waiver_acceptances WHERE membership_id = $1', [m.memberId])).toHaveLength(1)
  })
})

describe('the dashboard\'s approval card', () => {
  let admin: string

  beforeAll(async () => {
    const club = await makeClub()
    const make = (o: MemberOverrides) => makeMember({ clubId: club.id, ...o })
    const a = await make({ roles: ['admin'] })
    await Promise.all([
      make({ approved: false, paidDays: null }), // ready
      make({ approved: false, paidDays: null, verified: false }), // waits for the e-mail
      make({ approved: false, paidDays: null, birthDate: clubDay(-15 * 365), guardianName: 'G', guardianEmail: 'g@test.hoopwise.example' }), // waits for consent
      make({ approved: false, paidDays: null, birthDate: clubDay(-15 * 365), guardianName: 'G', guardianEmail: 'g2@test.hoopwise.example', guardianConsent: true }), // ready
    ])
    admin = await signInAs(a)
  })

  it('counts every sign-up to approve and says how many are ready and how many still wait', async () => {
    const res = await api<DashboardDto>('/api/dashboard', { as: admin })
    expect(res.status).toBe(200)
    expect(res.body.cards.find(c => c.key === 'pending-approvals')).toMatchObject({
      value: 4,
      tone: 'attention',
      hint: '2 ready to approve; 2 still wait for a confirmed e-mail or a guardian\'s consent. The pending list also shows approved members who have not paid yet.',
    })
  })
})
