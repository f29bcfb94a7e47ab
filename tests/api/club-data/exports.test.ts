import { randomUUID } from 'node:crypto'
import { beforeAll, describe, expect, it } from 'vitest'
import Papa from 'papaparse'
import { api, sessionCookieOf } from '../../support/http'
import { clubDay, makeFill, makeFillStation, makeLaunchEvent, makeMember, makeTier, makeTrainingRecord, makeVessel, type MadeMember } from '../../support/factories'
import { planId } from '../dues/support'

// Every CSV export read back with a real CSV parser: the list's filters applied, a text cell that
// would start a formula prefixed with a single quote (OWASP), and numbers left as numbers.

type Row = Record<string, string | number | boolean | null>

/** Fetches an export as `as` (a demo role or a cookie) and parses it, numbers typed. */
async function exportRows(path: string, as: string, query: Record<string, string | number | undefined> = {}): Promise<Row[]> {
  const res = await api<string>(path, { as, query, headers: { accept: 'text/csv' } })
  expect(res.status, `${path}: ${JSON.stringify(res.body).slice(0, 200)}`).toBe(200)
  expect(res.headers.get('content-type')).toMatch(/^text\/csv/)
  expect(res.headers.get('content-disposition')).toMatch(/^attachment; filename="[\w.-]+\.csv"$/)
  const parsed = Papa.parse<Row>(res.body, { header: true, dynamicTyping: true, skipEmptyLines: true })
  expect(parsed.errors).toEqual([])
  return parsed.data
}

async function signInAs(m: MadeMember): Promise<string> {
  const res = await api('/api/auth/login', { body: { email: m.email, password: m.password } })
  expect(res.status).toBe(200)
  return sessionCookieOf(res)
}

const tag = `Qx${randomUUID().slice(0, 6)}`
const people = {} as Record<'sum' | 'plus' | 'minus' | 'at' | 'plain' | 'trainer', MadeMember>
let eventId = ''

beforeAll(async () => {
  const make = (name: string, o: Parameters<typeof makeMember>[0] = {}) => makeMember({ name: `${name} ${tag}`, ...o })
  people.sum = await make('=SUM(A1)')
  people.plus = await make('+123', { suspendedReason: 'Left the lid off the resin' })
  people.minus = await make('-Dash')
  people.at = await make('@Handle')
  people.plain = await make('Plain Person')
  people.trainer = await make('Tess Trainer', { roles: ['instructor'] })
})

describe('the member directory export', () => {
  it('applies the directory\'s filters and sort, defuses formula names and matches the list\'s total', async () => {
    const rows = await exportRows('/api/members/export', 'admin', { q: tag, sort: 'name', dir: 'asc' })
    const list = await api('/api/members', { as: 'admin', query: { q: tag, pageSize: 100 } })
    expect(rows).toHaveLength(list.body.total)
    expect(rows.map(r => r.name).sort()).toEqual([
      `'+123 ${tag}`, `'-Dash ${tag}`, `'=SUM(A1) ${tag}`, `'@Handle ${tag}`, `Plain Person ${tag}`, `Tess Trainer ${tag}`,
    ].sort())
    expect(rows.find(r => r.email === people.sum.email)!.status).toBe('Active')
    const suspended = await exportRows('/api/members/export', 'admin', { q: tag, status: 'suspended' })
    expect(suspended.map(r => r.name)).toEqual([`'+123 ${tag}`])
    expect(suspended[0]!.status).toBe('Suspended')
    const instructors = await exportRows('/api/members/export', 'admin', { q: tag, role: 'instructor' })
    expect(instructors.map(r => r.email)).toEqual([people.trainer.email])
  })

  it('is refused to a plain member, and a bad filter is a 400', async () => {
    expect((await api('/api/members/export', { as: 'member' })).status).toBe(403)
    expect((await api('/api/members/export', { as: 'admin', query: { status: 'sleeping' } })).status).toBe(400)
  })
})

describe('the vessels export', () => {
  it('lists the filtered vessels with numbers as numbers; a member exports only their own', async () => {
    await makeVessel({ ownerId: people.sum.memberId, name: '=cmd|calc', volumeL: 1.5 })
    await makeVessel({ ownerId: people.sum.memberId, name: 'Second bottle', state: 'retired' })
    await makeVessel({ ownerId: people.plain.memberId, name: '-negative hull' })
    const rows = await exportRows('/api/vessels/export', 'safety', { q: tag.toLowerCase() })
    expect(rows.map(r => r.name).sort()).toEqual(['\'-negative hull', '\'=cmd|calc', 'Second bottle'])
    const bottle = rows.find(r => r.name === '\'=cmd|calc')!
    expect(bottle.owner).toBe(`'=SUM(A1) ${tag}`)
    expect(bottle.volume_l).toBe(1.5)
    expect(bottle.diameter_mm).toBe(102)
    const retired = await exportRows('/api/vessels/export', 'safety', { q: tag.toLowerCase(), state: 'retired' })
    expect(retired.map(r => r.name)).toEqual(['Second bottle'])
    // Without vessels.read_all the export, like the list, holds the caller's own vessels only.
    expect(await exportRows('/api/vessels/export', 'admin', { q: tag.toLowerCase() })).toEqual([])
    const own = await exportRows('/api/vessels/export', await signInAs(people.plain))
    expect(own.map(r => r.name)).toEqual(['\'-negative hull'])
  })
})

describe('the training records export', () => {
  it('lists a member\'s records for an officer, and only their own for a member', async () => {
    await makeTrainingRecord({ memberId: people.sum.memberId, course: 'pressure_safety', trainerId: people.trainer.memberId, trainedOn: clubDay(-10) })
    await makeTrainingRecord({ memberId: people.minus.memberId, course: 'pressure_safety', trainerId: people.trainer.memberId, trainedOn: clubDay(-20) })
    const rows = await exportRows('/api/training/records/export', 'admin', { membershipId: people.sum.memberId })
    expect(rows).toHaveLength(1)
    expect(rows[0]).toMatchObject({ member: `'=SUM(A1) ${tag}`, course: 'pressure_safety', trained_to: clubDay(-10), trainer_name: `Tess Trainer ${tag}`, result: 'pass', confirmed: 'yes' })
    const club = await exportRows('/api/training/records/export', 'admin')
    expect(club.filter(r => String(r.member).endsWith(tag)).map(r => r.member).sort()).toEqual([`'-Dash ${tag}`, `'=SUM(A1) ${tag}`])
    const cookie = await signInAs(people.minus)
    expect((await exportRows('/api/training/records/export', cookie)).map(r => r.member)).toEqual([`'-Dash ${tag}`])
    expect((await api('/api/training/records/export', { as: cookie, query: { membershipId: people.sum.memberId } })).status).toBe(404)
  })
})

describe('the tiers export', () => {
  it('lists the tiers members hold with their state, the cap a number', async () => {
    await makeTier({ memberId: people.minus.memberId, rank: 1, signedOn: clubDay(-30), expiresOn: clubDay(300) })
    await makeTier({ memberId: people.minus.memberId, rank: 2, signedOn: clubDay(-30), expiresOn: clubDay(300), suspended: true })
    const rows = await exportRows('/api/tiers/export', 'safety', { membershipId: people.minus.memberId })
    expect(rows.map(r => [r.member, r.tier, r.state])).toEqual([[`'-Dash ${tag}`, 'T1', 'Valid'], [`'-Dash ${tag}`, 'T2', 'Suspended']])
    expect(typeof rows[0]!.fill_cap_bar).toBe('number')
    expect(rows[0]!.expires_on).toBe(clubDay(300))
    const club = await exportRows('/api/tiers/export', 'admin')
    expect(club.filter(r => r.member === `'-Dash ${tag}`)).toHaveLength(2)
    expect((await api('/api/tiers/export', { as: 'member' })).status).toBe(403)
  })
})

describe('the event fill log export', () => {
  it('keeps the outcome filter, defuses names and keeps pressures as numbers', async () => {
    const { stationId } = await makeFillStation({ name: `@Launcher ${tag}`, gaugeCalibratedOn: clubDay(-5) })
    ;({ eventId } = await makeLaunchEvent({ createdBy: people.trainer.memberId, heldOn: clubDay(-2), site: `Export field ${tag}`, stationIds: [stationId] }))
    const { vesselId } = await makeVessel({ ownerId: people.at.memberId, state: 'in_service' })
    await makeFill({ eventId, stationId, memberId: people.at.memberId, vesselId, pressureBar: 6.25 })
    await makeFill({ eventId, stationId, memberId: people.at.memberId, vesselId, pressureBar: 9, reasons: [{ code: 'TIER_CAP_EXCEEDED', message: 'Refused in a test' }] })
    const rows = await exportRows(`/api/events/${eventId}/fills/export`, 'admin', { sort: 'pressure', dir: 'asc' })
    expect(rows.map(r => [r.member, r.station, r.pressure_bar, r.outcome])).toEqual([
      [`'@Handle ${tag}`, `'@Launcher ${tag}`, 6.25, 'allowed'],
      [`'@Handle ${tag}`, `'@Launcher ${tag}`, 9, 'refused'],
    ])
    expect(rows[0]!.water_l).toBe(0.5)
    const refused = await exportRows(`/api/events/${eventId}/fills/export`, 'admin', { outcome: 'refused' })
    expect(refused.map(r => r.reasons)).toEqual(['TIER_CAP_EXCEEDED'])
  })
})

describe('the payments export', () => {
  it('keeps the filters, defuses a reference that starts with a minus, and the amount is a number', async () => {
    const student = await planId('student')
    const pay = (o: Record<string, unknown>) => api('/api/dues/payments', { as: 'admin', body: { memberId: people.at.memberId, planId: student, amountMinor: 4250, ...o } })
    expect((await pay({ method: 'cash', paidOn: clubDay(-1), reference: `-5 off, ${tag}` })).status).toBe(200)
    expect((await pay({ method: 'transfer', paidOn: clubDay(0), reference: `+transfer ${tag}` })).status).toBe(200)
    const rows = (await exportRows('/api/dues/payments/export', 'admin', { method: 'cash', from: clubDay(-1), to: clubDay(-1) }))
      .filter(r => r.member === `'@Handle ${tag}`)
    expect(rows.map(r => [r.method, r.reference, r.amount])).toEqual([['Cash', `'-5 off, ${tag}`, 42.5]])
  })
})

describe('the audit desk export', () => {
  it('writes its tables through the same writer', async () => {
    await makeTier({ memberId: people.sum.memberId, rank: 1, signedOn: clubDay(-300), expiresOn: clubDay(20) })
    const rows = await exportRows('/api/audit/desk/tiers-expiring/export', 'safety', { q: tag, within: 30 })
    expect(rows.map(r => [r.member, r.daysLeft])).toEqual([[`'=SUM(A1) ${tag}`, 20]])
  })
})
