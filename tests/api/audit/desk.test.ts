import { beforeAll, describe, expect, it } from 'vitest'
import { api, sessionCookieOf } from '../../support/http'
import { clubDay, makeClub, makeFill, makeFillStation, makeIncident, makeLaunchEvent, makeMember, makeProofTest, makeTier, makeTrainingRecord, makeVessel, type MadeMember } from '../../support/factories'
import { parseCsv } from '../../support/csv'
import { sql } from '../../support/db'
import type { DeskChartsDto, DeskCountDto, DeskCountsDto, DeskPageDto } from '../../../shared/types/audit-desk'
import { DESK_TABLES, type DeskTable } from '../../../shared/utils/audit-desk'

// The desk counts a whole club, so these tests build a club of their own with exactly what each
// table should find (and, beside it, what it must not).

async function signInAs(m: MadeMember): Promise<string> {
  const res = await api('/api/auth/login', { body: { email: m.email, password: m.password } })
  expect(res.status).toBe(200)
  return sessionCookieOf(res)
}

const as = { safety: '', admin: '' }
const ids: Record<string, string> = {}
const INJURY = 'Bruised left forearm, treated with ice at the field'

beforeAll(async () => {
  const club = await makeClub()
  const safety = await makeMember({ clubId: club.id, roles: ['instructor', 'safety_officer'], name: 'Sabine Deskwarden' })
  const admin = await makeMember({ clubId: club.id, roles: ['admin'] })
  const m = async (name: string) => (await makeMember({ clubId: club.id, name })).memberId
  Object.assign(ids, {
    safety: safety.memberId,
    in20: await m('Ada Twentyday'), in50: await m('Bo Fiftyday'), in80: await m('Cy Eightyday'), in120: await m('Di Farday'),
    lapsedAfterFill: await m('Ed Lapsedafter'), lapsedBeforeFill: await m('Flo Lapsedbefore'), suspendedAfterFill: await m('Gus Suspended'),
    trainee: await m('Hal Trainee'),
  })
  // Tiers in force expiring in 20, 50, 80 and 120 days; a suspended one expiring in 10 (not "expiring": suspended).
  await makeTier({ memberId: ids.in20!, rank: 1, signedOn: clubDay(-300), expiresOn: clubDay(20) })
  await makeTier({ memberId: ids.in50!, rank: 2, signedOn: clubDay(-300), expiresOn: clubDay(50) })
  await makeTier({ memberId: ids.in80!, rank: 1, signedOn: clubDay(-300), expiresOn: clubDay(80) })
  await makeTier({ memberId: ids.in120!, rank: 1, signedOn: clubDay(-300), expiresOn: clubDay(120) })

  // Training: the trainee's latest pressure course expires in 25 days (an older one in 10 is superseded); a fit test in 55.
  await makeTrainingRecord({ memberId: ids.trainee!, course: 'pressure_safety', trainerId: ids.safety!, trainedOn: clubDay(-700), expiresOn: clubDay(10) })
  await makeTrainingRecord({ memberId: ids.trainee!, course: 'pressure_safety', trainerId: ids.safety!, trainedOn: clubDay(-300), expiresOn: clubDay(25) })
  await makeTrainingRecord({ memberId: ids.trainee!, course: 'respirator_fit', trainerId: ids.safety!, trainedOn: clubDay(-300), expiresOn: clubDay(55) })

  // Fills at an event 30 days ago.
  const { stationId } = await makeFillStation({ clubId: club.id, name: 'Desk launcher', gaugeCalibratedOn: clubDay(-10) })
  const { eventId } = await makeLaunchEvent({ createdBy: ids.safety!, heldOn: clubDay(-30), site: 'Desk field', stationIds: [stationId] })
  ids.event = eventId
  const vessel = async (ownerId: string, state: 'in_service' | 'quarantined' | 'failed', testedOn?: string) => {
    const v = await makeVessel({ ownerId, state })
    if (testedOn) await makeProofTest({ vesselId: v.vesselId, witnessId: ids.safety!, testedOn })
    return v
  }
  const fresh = await vessel(ids.lapsedAfterFill!, 'in_service', clubDay(-10))
  // Each fill made at the tier the gate saw then (the tiers are written below, as they stand today).
  await makeFill({ eventId, stationId, memberId: ids.lapsedAfterFill!, vesselId: fresh.vesselId, tierRank: 1 })
  await makeFill({ eventId, stationId, memberId: ids.lapsedBeforeFill!, vesselId: fresh.vesselId, tierRank: null })
  await makeFill({ eventId, stationId, memberId: ids.suspendedAfterFill!, vesselId: fresh.vesselId, supervisorId: ids.safety, tierRank: 2 })
  await makeFill({ eventId, stationId, memberId: ids.in20!, vesselId: fresh.vesselId, reasons: [{ code: 'TIER_CAP_EXCEEDED', message: 'Refused in a test' }] })
  // Lapsed 5 days ago (after the fill), lapsed 60 days ago (before it), suspended after the fill.
  await makeTier({ memberId: ids.lapsedAfterFill!, rank: 1, signedOn: clubDay(-700), expiresOn: clubDay(-5) })
  await makeTier({ memberId: ids.lapsedBeforeFill!, rank: 1, signedOn: clubDay(-700), expiresOn: clubDay(-60) })
  await makeTier({ memberId: ids.suspendedAfterFill!, rank: 2, signedOn: clubDay(-100), expiresOn: clubDay(300), suspended: true, assessorId: ids.safety })

  // Vessels: a proof lapsing in about 15 days, one lapsed, one current; one quarantined, one failed.
  ids.lapsing = (await vessel(ids.in50!, 'in_service', clubDay(-350))).tag
  ids.lapsed = (await vessel(ids.in50!, 'in_service', clubDay(-400))).tag
  ids.fresh = fresh.tag
  ids.quarantined = (await vessel(ids.in80!, 'quarantined')).tag
  ids.failed = (await vessel(ids.in80!, 'failed')).tag

  // Gauges: due in about 15 days, past due, current (made above), and a current one.
  await makeFillStation({ clubId: club.id, name: 'Due launcher', gaugeCalibratedOn: clubDay(-350), gaugeIntervalMonths: 12 })
  await makeFillStation({ clubId: club.id, name: 'Late launcher', gaugeCalibratedOn: clubDay(-400), gaugeIntervalMonths: 12 })

  // Incidents: an open injury on the quarantined vessel, an open near miss at the event, a closed one.
  await makeIncident({ reportedBy: ids.in80!, kind: 'injury', vesselId: (await vessel(ids.in80!, 'quarantined')).vesselId, injuryDetails: INJURY, peopleIds: [ids.in80!] })
  await makeIncident({ reportedBy: ids.in20!, kind: 'near_miss', eventId })
  await makeIncident({ reportedBy: ids.in20!, kind: 'other', closed: true })

  as.safety = await signInAs(safety)
  as.admin = await signInAs(admin)
})

async function counts(who = as.safety): Promise<Record<DeskTable, DeskCountDto>> {
  const res = await api<DeskCountsDto>('/api/audit/desk', { as: who })
  expect(res.status).toBe(200)
  return Object.fromEntries(res.body.counts.map(c => [c.table, c])) as Record<DeskTable, DeskCountDto>
}

async function page(table: DeskTable, query: Record<string, string | number> = {}, who = as.safety): Promise<DeskPageDto> {
  const res = await api<DeskPageDto>(`/api/audit/desk/${table}`, { as: who, query })
  expect(res.status, JSON.stringify(res.body)).toBe(200)
  return res.body
}

const col = (p: DeskPageDto, key: string) => p.items.map(r => r.cells[key])

describe('the audit desk counts', () => {
  it('counts every table of the club, the expiring ones within 30, 60 and 90 days', async () => {
    const c = await counts()
    expect(c['tiers-expiring']).toMatchObject({ total: 3, within: { 30: 1, 60: 2, 90: 3 } })
    expect(c['training-expiring']).toMatchObject({ total: 1, within: { 30: 1, 60: 1, 90: 1 } })
    expect(c['fit-tests-expiring']).toMatchObject({ total: 1, within: { 30: 0, 60: 1, 90: 1 } })
    expect(c['tiers-lapsed'].total).toBe(3)
    expect(c['refused-next'].total).toBe(2)
    expect(c.proofs).toMatchObject({ total: 2, within: { 30: 2, 60: 2, 90: 2 } })
    expect(c['vessels-held'].total).toBe(3)
    expect(c.gauges.total).toBe(2)
    expect(c['event-fills']).toMatchObject({ total: 1, extra: { refused: 1, supervised: 1 } })
    expect(c.incidents.total).toBe(2)
    expect(Object.keys(c).sort()).toEqual([...DESK_TABLES].sort())
  })

  it('agrees with each table\'s own total', async () => {
    const c = await counts()
    for (const t of DESK_TABLES) expect((await page(t)).total, t).toBe(c[t].total)
  })
})

describe('the audit desk tables', () => {
  it('lists expiring tiers in the window, soonest first, each linked to its member', async () => {
    const p = await page('tiers-expiring')
    expect(col(p, 'member')).toEqual(['Ada Twentyday', 'Bo Fiftyday', 'Cy Eightyday'])
    expect(p.items[0]!.link.to).toBe(`/members/${ids.in20}`)
    expect(col(p, 'daysLeft')).toEqual([20, 50, 80])
    expect(col(await page('tiers-expiring', { within: 60 }), 'member')).toEqual(['Ada Twentyday', 'Bo Fiftyday'])
    expect(col(await page('tiers-expiring', { sort: 'daysLeft', dir: 'desc' }), 'daysLeft')).toEqual([80, 50, 20])
    expect(col(await page('tiers-expiring', { q: 'fifty' }), 'member')).toEqual(['Bo Fiftyday'])
    const second = await page('tiers-expiring', { pageSize: 2, page: 2 })
    expect([second.total, col(second, 'member')]).toEqual([3, ['Cy Eightyday']])
  })

  it('takes only the latest passed record of a course, and keeps fit tests apart', async () => {
    expect(col(await page('training-expiring'), 'expiresOn')).toEqual([clubDay(25)])
    expect(col(await page('fit-tests-expiring'), 'expiresOn')).toEqual([clubDay(55)])
  })

  it('lists lapsed and suspended tiers, filtered by standing', async () => {
    const p = await page('tiers-lapsed', { sort: 'member', dir: 'asc' })
    expect(col(p, 'member')).toEqual(['Ed Lapsedafter', 'Flo Lapsedbefore', 'Gus Suspended'])
    expect(col(p, 'state')).toEqual(['Lapsed', 'Lapsed', 'Suspended'])
    expect(col(await page('tiers-lapsed', { state: 'suspended' }), 'member')).toEqual(['Gus Suspended'])
  })

  it('lists the members whose tier lapsed or was suspended since their last fill, not one whose tier lapsed before it', async () => {
    const p = await page('refused-next', { sort: 'member', dir: 'asc' })
    expect(col(p, 'member')).toEqual(['Ed Lapsedafter', 'Gus Suspended'])
    expect(col(p, 'lastFillOn')).toEqual([clubDay(-30), clubDay(-30)])
  })

  it('lists proofs lapsing and lapsed, and the vessels out of service, linked by tag', async () => {
    const p = await page('proofs', { sort: 'vessel', dir: 'asc' })
    expect(p.items.map(r => [r.link.to, r.cells.state])).toEqual([
      [`/vessels/${ids.lapsing}`, 'Lapsing'], [`/vessels/${ids.lapsed}`, 'Lapsed'],
    ])
    expect(col(await page('proofs', { state: 'lapsed' }), 'vessel')).toEqual([ids.lapsed])
    expect(col(await page('proofs', { within: 30, state: 'lapsing' }), 'vessel')).toEqual([ids.lapsing])
    const held = await page('vessels-held', { state: 'failed' })
    expect(held.items.map(r => r.link.to)).toEqual([`/vessels/${ids.failed}`])
  })

  it('lists gauges due and past due by the gauge rule', async () => {
    const p = await page('gauges', { sort: 'station', dir: 'asc' })
    expect(p.items.map(r => [r.cells.station, r.cells.state])).toEqual([['Due launcher', 'Calibration due soon'], ['Late launcher', 'Past calibration']])
  })

  it('counts allowed, refused and supervised fills per event, linked to the event', async () => {
    const p = await page('event-fills')
    expect(p.items.map(r => [r.link.to, r.cells.fills, r.cells.refused, r.cells.supervised])).toEqual([[`/events/${ids.event}`, 3, 1, 1]])
  })

  it('refuses a column the table does not sort by and a standing it does not have', async () => {
    expect((await api('/api/audit/desk/tiers-expiring', { as: as.safety, query: { sort: 'email' } })).status).toBe(400)
    expect((await api('/api/audit/desk/gauges', { as: as.safety, query: { state: 'lapsed' } })).status).toBe(400)
    expect((await api('/api/audit/desk/nothing', { as: as.safety })).status).toBe(404)
  })
})

describe('open incidents on the desk', () => {
  it('shows the safety officer an injury\'s details', async () => {
    const p = await page('incidents', { sort: 'kind', dir: 'asc' })
    expect(col(p, 'kind')).toEqual(['Injury', 'Near miss'])
    expect(col(p, 'injuryDetails')).toEqual([INJURY, null])
    expect(p.items[1]!.link.to).toBe(`/events/${ids.event}`)
  })

  it('shows an admin no injury details, in the table or its CSV', async () => {
    const res = await api<DeskPageDto>('/api/audit/desk/incidents', { as: as.admin })
    expect(res.status).toBe(200)
    expect(res.body.total).toBe(2)
    expect(res.body.columns.map(c => c.key)).not.toContain('injuryDetails')
    expect(JSON.stringify(res.body)).not.toContain('forearm')
    const csv = await api<string>('/api/audit/desk/incidents/export', { as: as.admin })
    expect(csv.status).toBe(200)
    expect(parseCsv(csv.body)[0]).not.toContain('injuryDetails')
    expect(csv.body).not.toContain('forearm')
  })
})

describe('the desk CSV', () => {
  it.each(DESK_TABLES.map(t => [t]))('%s exports every row the filter selects, with the cells the table shows', async (table) => {
    const full = await page(table, { pageSize: 100 })
    const res = await api<string>(`/api/audit/desk/${table}/export`, { as: as.safety })
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toMatch(/^text\/csv/)
    const [header, ...rows] = parseCsv(res.body)
    expect(header).toEqual([...full.columns.map(c => c.key), 'link'])
    expect(rows).toHaveLength(full.total)
    expect(rows).toEqual(full.items.map(r => [...full.columns.map(c => r.cells[c.key] === null ? '' : String(r.cells[c.key])), r.link.to]))
  })

  it('takes the table\'s filter', async () => {
    const res = await api<string>('/api/audit/desk/tiers-expiring/export', { as: as.safety, query: { within: 30 } })
    const rows = parseCsv(res.body).slice(1)
    expect(rows.map(r => r[0])).toEqual(['Ada Twentyday'])
  })

  // COPY takes no bind parameters, so the search is inlined as an escaped literal: text that looks like
  // a replacement, a quote, a backslash or a dollar quote is searched for, never run.
  it.each([[':clubId'], ['\'; DROP TABLE users; --'], ['\\'], ['$$'], ['Twenty']])('searches for %j as text', async (q) => {
    const res = await api<string>('/api/audit/desk/tiers-expiring/export', { as: as.safety, query: { q } })
    expect(res.status).toBe(200)
    const rows = parseCsv(res.body).slice(1)
    expect(rows.map(r => r[0])).toEqual(q === 'Twenty' ? ['Ada Twentyday'] : [])
  })
})

describe('the desk charts', () => {
  it('counts expiries per week for 26 weeks and fills per event by the filler\'s tier that day', async () => {
    const res = await api<DeskChartsDto>('/api/audit/desk/charts', { as: as.safety })
    expect(res.status).toBe(200)
    const { weeks, events } = res.body
    expect(weeks).toHaveLength(26)
    expect(weeks[0]!.start).toBe(clubDay(0))
    const sum = (k: 'tiers' | 'training' | 'fitTests' | 'proofs') => weeks.reduce((n, w) => n + w[k], 0)
    // Tiers in 20, 50, 80 and 120 days (all within 26 weeks); training in 25; fit test in 55; one proof lapsing.
    expect([sum('tiers'), sum('training'), sum('fitTests'), sum('proofs')]).toEqual([4, 1, 1, 1])
    expect(weeks[Math.floor(20 / 7)]!.tiers).toBe(1)
    // At the event: Ed at T1, Flo at none (T1 lapsed 30 days before), Gus at T2 (suspended since): allowed fills only.
    expect(events).toEqual([{ eventId: ids.event, heldOn: clubDay(-30), site: 'Desk field', byRank: [0, 1, 1, 0, 0], none: 1 }])
  })
})

describe('the audit trail\'s filter by kind of record', () => {
  it('lists only the entries about that kind of record', async () => {
    const [m] = await sql<{ club_id: string }>('SELECT club_id FROM memberships WHERE id = $1', [ids.safety])
    for (const [type, action] of [['vessel', 'vessel.quarantine'], ['membership', 'member.edit'], ['launch_event', 'event.create']] as const) {
      await sql(`INSERT INTO audit_events (club_id, actor_membership_id, action, subject_type, subject_id) VALUES ($1, $2, $3, $4, $2)`,
        [m!.club_id, ids.safety, action, type])
    }
    const res = await api<{ items: { subjectType: string }[], total: number }>('/api/audit', { as: as.safety, query: { subjectType: 'vessel' } })
    expect(res.status).toBe(200)
    expect(res.body.items.map(e => e.subjectType)).toEqual(['vessel'])
    expect((await api('/api/audit', { as: as.safety, query: { subjectType: 'secrets' } })).status).toBe(400)
  })
})
