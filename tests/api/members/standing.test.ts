import { describe, expect, it } from 'vitest'
import { api, sessionCookieOf } from '../../support/http'
import { clubDay, makeMember, type MadeMember, type MemberOverrides } from '../../support/factories'
import { sql } from '../../support/db'
import type { MemberDto, StandingDto } from '../../../shared/types/dto'

async function signInAs(m: MadeMember): Promise<string> {
  const res = await api('/api/auth/login', { body: { email: m.email, password: m.password } })
  expect(res.status).toBe(200)
  return sessionCookieOf(res)
}

async function standingOf(o: MemberOverrides) {
  const made = await makeMember(o)
  const res = await api<StandingDto>('/api/me/standing', { as: await signInAs(made) })
  expect(res.status).toBe(200)
  return { made, standing: res.body, codes: res.body.attention.map(a => a.code) }
}

// Waiver tests in other files may publish a new version at any moment in the demo club, so
// "nothing else needs attention" is checked without the waiver item unless a case is about it.
const withoutWaiver = (codes: string[]) => codes.filter(c => c !== 'WAIVER_NOT_ACCEPTED')

describe('GET /api/me/standing', () => {
  it('answers 401 when not signed in', async () => {
    expect((await api('/api/me/standing')).status).toBe(401)
  })

  it('gives the signed-in member their record, the club and today in the club\'s time zone', async () => {
    const { made, standing } = await standingOf({ paidDays: 100 })
    expect(standing.member).toMatchObject({ id: made.memberId, name: made.name, email: made.email, status: 'active', paidThrough: clubDay(100) })
    expect(standing.club).toMatchObject({ name: 'Saltmarsh Rocketry Guild', timeZone: 'Europe/London', graceDays: 30 })
    expect(standing.today).toBe(clubDay(0))
    expect(standing.daysToExpiry).toBe(100)
    expect(withoutWaiver(standing.attention.map(a => a.code))).toEqual([])
    expect(JSON.stringify(standing)).not.toMatch(/password|hash/i)
  })

  it.each<[string, MemberOverrides, string[], string[]]>([
    ['an unverified e-mail', { verified: false }, ['EMAIL_UNVERIFIED'], []],
    ['a sign-up awaiting approval', { approved: false, paidDays: null }, ['AWAITING_APPROVAL'], ['DUES_NEVER_PAID']],
    ['an approved sign-up who never paid', { paidDays: null }, ['DUES_NEVER_PAID'], ['AWAITING_APPROVAL']],
    ['dues ending in 10 days', { paidDays: 10 }, ['DUES_EXPIRING'], ['DUES_GRACE']],
    ['dues ending in exactly 30 days', { paidDays: 30 }, ['DUES_EXPIRING'], []],
    ['dues ending in 31 days', { paidDays: 31 }, [], ['DUES_EXPIRING']],
    ['dues ended yesterday (grace)', { paidDays: -1 }, ['DUES_GRACE'], ['DUES_EXPIRING', 'DUES_LAPSED']],
    ['dues ended 31 days ago (lapsed)', { paidDays: -31 }, ['DUES_LAPSED'], ['DUES_GRACE']],
    ['a suspended member', { suspendedReason: 'Filled above the cap (test)' }, ['SUSPENDED'], ['DUES_EXPIRING', 'DUES_LAPSED']],
    ['a resigned member with old dues', { resigned: true, paidDays: -200 }, ['RESIGNED'], ['DUES_LAPSED']],
    ['a junior without guardian consent', { birthDate: clubDay(-14 * 365), guardianName: 'Pell Saltreed', guardianEmail: 'pell@family.test', guardianConsent: false }, ['GUARDIAN_CONSENT_MISSING'], []],
    ['a junior whose guardian consented', { birthDate: clubDay(-14 * 365), guardianName: 'Pell Saltreed', guardianEmail: 'pell@family.test', guardianConsent: true }, [], ['GUARDIAN_CONSENT_MISSING']],
    ['an adult with no guardian', { birthDate: clubDay(-40 * 365) }, [], ['GUARDIAN_CONSENT_MISSING']],
    ['a member who never accepted the waiver', { acceptWaiver: false }, ['WAIVER_NOT_ACCEPTED'], []],
  ])('lists what needs attention for %s', async (_label, overrides, present, absent) => {
    const { codes, standing } = await standingOf(overrides)
    for (const code of present) expect(codes).toContain(code)
    for (const code of absent) expect(codes).not.toContain(code)
    for (const item of standing.attention) {
      expect(item.message.length).toBeGreaterThan(10)
      expect(item.to).toMatch(/^\/(standing|waiver|profile)$/)
    }
  })

  it('says how long grace lasts, with the date it ends', async () => {
    const { standing } = await standingOf({ paidDays: -5 })
    expect(standing.member.status).toBe('grace')
    expect(standing.daysToExpiry).toBe(-5)
    // Paid through 5 days ago + 30 days' grace = 25 days from today, written "D Month YYYY".
    const [year, month, day] = clubDay(25).split('-').map(Number) as [number, number, number]
    const months = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December']
    expect(standing.attention.find(a => a.code === 'DUES_GRACE')?.message).toContain(`${day} ${months[month - 1]} ${year}`)
  })

  it('has nothing but the approval to wait for on a fresh, verified sign-up', async () => {
    const { codes } = await standingOf({ approved: false, paidDays: null })
    expect(withoutWaiver(codes)).toEqual(['AWAITING_APPROVAL'])
  })
})

describe('PATCH /api/me/profile', () => {
  const valid = { name: 'Corin Shinglebank', phone: '+44 1632 960777', emergencyContactName: 'Fable Shinglebank', emergencyContactPhone: '01632 960778', unitPreference: 'psi' }

  it('answers 401 when not signed in', async () => {
    expect((await api('/api/me/profile', { method: 'PATCH', body: valid })).status).toBe(401)
  })

  it('saves my name and contact details, and the session and standing follow', async () => {
    const made = await makeMember()
    const cookie = await signInAs(made)
    const res = await api<MemberDto>('/api/me/profile', { method: 'PATCH', body: { ...valid, name: '  Corin Shinglebank ' }, as: cookie })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ id: made.memberId, ...valid })
    const [row] = await sql<{ name: string, phone: string, unit_preference: string, emergency_contact_name: string }>(
      `SELECT u.name, m.phone, m.unit_preference, m.emergency_contact_name FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.id = $1`, [made.memberId])
    expect(row).toEqual({ name: valid.name, phone: valid.phone, unit_preference: 'psi', emergency_contact_name: valid.emergencyContactName })
    const session = await api('/api/_auth/session', { as: res.headers.getSetCookie().length ? sessionCookieOf(res) : cookie })
    expect(session.body.user.name).toBe(valid.name)
    expect(session.body.user.roles).toEqual(['member'])
    expect((await api<StandingDto>('/api/me/standing', { as: cookie })).body.member.unitPreference).toBe('psi')
  })

  it('clears optional fields sent empty and keeps those left out', async () => {
    const made = await makeMember()
    const cookie = await signInAs(made)
    await api('/api/me/profile', { method: 'PATCH', body: valid, as: cookie })
    const res = await api<MemberDto>('/api/me/profile', { method: 'PATCH', body: { name: valid.name, unitPreference: 'bar', phone: '' }, as: cookie })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ phone: null, emergencyContactName: valid.emergencyContactName, emergencyContactPhone: valid.emergencyContactPhone, unitPreference: 'bar' })
  })

  it('does not write an audit event for the member\'s own contact details', async () => {
    const made = await makeMember()
    // The same name: a new one is audited (tests/api/audit/audit-personal-data.test.ts).
    await api('/api/me/profile', { method: 'PATCH', body: { ...valid, name: made.name }, as: await signInAs(made) })
    expect(await sql(`SELECT 1 FROM audit_events WHERE subject_id = $1`, [made.memberId])).toEqual([])
  })

  it.each<[string, unknown, string]>([
    ['an empty name', { ...valid, name: '' }, 'name'],
    ['an oversize name', { ...valid, name: 'n'.repeat(500) }, 'name'],
    ['letters in the phone number', { ...valid, phone: 'call me maybe' }, 'phone'],
    ['an unknown unit', { ...valid, unitPreference: 'atm' }, 'unitPreference'],
    ['a number for the name', { ...valid, name: 7 }, 'name'],
  ])('refuses %s with 400 and a field message, writing nothing', async (_label, body, field) => {
    const made = await makeMember({ name: 'Unchanged Name' })
    const res = await api('/api/me/profile', { method: 'PATCH', body, as: await signInAs(made) })
    expect(res.status).toBe(400)
    expect(res.body.data.fields[field]).toBeTruthy()
    const [row] = await sql<{ name: string, phone: string | null, unit_preference: string }>(
      `SELECT u.name, m.phone, m.unit_preference FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.id = $1`, [made.memberId])
    expect(row).toEqual({ name: 'Unchanged Name', phone: null, unit_preference: 'bar' })
  })

  it('refuses malformed JSON with 400', async () => {
    const made = await makeMember()
    const res = await api('/api/me/profile', { method: 'PATCH', body: '{"name": ', as: await signInAs(made) })
    expect(res.status).toBe(400)
  })
})
