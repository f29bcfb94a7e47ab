import { beforeAll, describe, expect, it } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { NOW, acceptWaiver, clubDay, makeClub, setMembership, makeFill, makeFillStation, makeLaunchEvent, makeProofTest, makeTier, makeTrainingRecord, makeVessel, makeWaiver } from '../../support/factories'
import { person, type Person } from '../vessels/proof-support'
import type { FillStationDto, FillStationListDto, LaunchEventDto, LaunchRosterDto } from '../../../shared/types/events'

// A club of the tests' own: its events, stations, notices and policy belong to this file alone.
let clubId = ''
let member: Person
let other: Person
let instructor: Person
let safety: Person
let admin: Person
let stationId = ''

const eventBody = (o: Record<string, unknown> = {}) => ({
  heldOn: clubDay(20), site: 'Test flat', pressureCap: 12, unit: 'bar', competition: false, notes: '',
  stationIds: [stationId], staffIds: [instructor.memberId], ...o,
})
const noticeCount = (memberId: string, kind: string) =>
  sql<{ n: number }>('SELECT count(*)::int AS n FROM notices WHERE membership_id = $1 AND kind = $2', [memberId, kind]).then(r => r[0]!.n)

beforeAll(async () => {
  ({ id: clubId } = await makeClub({ tagPrefix: 'EVT' }))
  ;[member, other, instructor, safety, admin] = await Promise.all([
    person(clubId), person(clubId), person(clubId, ['instructor']), person(clubId, ['instructor', 'safety_officer']), person(clubId, ['admin']),
  ])
  stationId = (await makeFillStation({ clubId, lowestPartRatingBar: 60 })).stationId
})

describe('fill stations', () => {
  const body = { name: 'Pad one launcher', description: 'Clamp launcher', lowestPartRating: 45, unit: 'bar', gaugeName: 'Gauge 1', gaugeCalibratedOn: clubDay(-30), gaugeIntervalMonths: 12 }

  it('an officer with events.manage adds one; its launch pressure is the rating ÷ the equipment factor (3 by default)', async () => {
    const res = await api<FillStationDto>('/api/fill-stations', { method: 'POST', as: safety.cookie, body })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ lowestPartRatingBar: 45, launchLimitBar: 15, equipmentFactor: 3, gaugeState: 'current' })
    // The admin holds events.manage too; a member and an instructor do not.
    expect((await api('/api/fill-stations', { method: 'POST', as: admin.cookie, body: { ...body, name: 'Pad two launcher' } })).status).toBe(201)
    for (const who of [member, instructor]) expect((await api('/api/fill-stations', { method: 'POST', as: who.cookie, body })).status).toBe(403)
    // The same name twice: 409.
    expect((await api('/api/fill-stations', { method: 'POST', as: safety.cookie, body })).status).toBe(409)
  })

  it('takes the rating in psi, kept in bar rounded down', async () => {
    const res = await api<FillStationDto>('/api/fill-stations', { method: 'POST', as: safety.cookie, body: { ...body, name: 'Psi launcher', lowestPartRating: 300, unit: 'psi' } })
    expect(res.status).toBe(201)
    // 300 psi = 20.684… bar (NIST SP 811: 1 psi = 6894.757 Pa).
    expect(res.body.lowestPartRatingBar).toBe(20.68)
  })

  it.each([
    ['a zero rating', { lowestPartRating: 0 }, 'lowestPartRating'],
    ['a rating over 1000 bar', { lowestPartRating: 1001 }, 'lowestPartRating'],
    ['an unknown unit', { unit: 'kPa' }, 'unit'],
    ['a zero interval', { gaugeIntervalMonths: 0 }, 'gaugeIntervalMonths'],
    ['no calibration date', { gaugeCalibratedOn: '2025-02-30' }, 'gaugeCalibratedOn'],
  ])('refuses %s with 400', async (_label, change, field) => {
    const res = await api('/api/fill-stations', { method: 'POST', as: safety.cookie, body: { ...body, name: 'Bad launcher', ...change } })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.data.fields)).toContain(field)
  })

  it('lists gauges past calibration and due within 30 days first; staff and officers read the list, members do not', async () => {
    const past = await makeFillStation({ clubId, name: 'Past gauge launcher', gaugeCalibratedOn: clubDay(-400), gaugeIntervalMonths: 12 })
    const soon = await makeFillStation({ clubId, name: 'Soon gauge launcher', gaugeCalibratedOn: clubDay(-350), gaugeIntervalMonths: 12 })
    const res = await api<FillStationListDto>('/api/fill-stations', { as: instructor.cookie })
    expect(res.status).toBe(200)
    expect(res.body.gaugesDue.map(s => [s.id, s.gaugeState])).toEqual([[past.stationId, 'past_due'], [soon.stationId, 'due_soon']])
    expect(res.body.items.find(s => s.id === stationId)!.gaugeState).toBe('current')
    expect((await api('/api/fill-stations', { as: member.cookie })).status).toBe(403)
  })

  it('edits and retires a station (audited); a retired one is left out of the list and refuses edits; another club\'s is 404', async () => {
    const { stationId: id } = await makeFillStation({ clubId, name: 'To retire' })
    const edit = await api<FillStationDto>(`/api/fill-stations/${id}`, { method: 'PUT', as: safety.cookie, body: { ...body, name: 'To retire', lowestPartRating: 30 } })
    expect(edit.status).toBe(200)
    expect(edit.body.launchLimitBar).toBe(10)
    expect((await api(`/api/fill-stations/${id}/retire`, { method: 'POST', as: member.cookie, body: { reason: 'Worn' } })).status).toBe(403)
    expect((await api(`/api/fill-stations/${id}/retire`, { method: 'POST', as: safety.cookie, body: {} })).status).toBe(400)
    expect((await api(`/api/fill-stations/${id}/retire`, { method: 'POST', as: safety.cookie, body: { reason: 'Hose perished' } })).status).toBe(200)
    expect((await api(`/api/fill-stations/${id}/retire`, { method: 'POST', as: safety.cookie, body: { reason: 'Again' } })).status).toBe(422)
    expect((await api(`/api/fill-stations/${id}`, { method: 'PUT', as: safety.cookie, body: { ...body, name: 'To retire' } })).status).toBe(422)
    const list = await api<FillStationListDto>('/api/fill-stations', { as: safety.cookie })
    expect(list.body.items.some(s => s.id === id)).toBe(false)
    const audit = await sql<{ action: string }>(`SELECT action FROM audit_events WHERE subject_id = $1 ORDER BY created_at`, [id])
    expect(audit.map(a => a.action)).toEqual(['fill_station.update', 'fill_station.retire'])
    const { stationId: foreign } = await makeFillStation()
    expect((await api(`/api/fill-stations/${foreign}`, { method: 'PUT', as: safety.cookie, body: { ...body, name: 'Stolen' } })).status).toBe(404)
  })

  it('follows the club\'s equipment factor, which is never below 3', async () => {
    const policy = await api('/api/vessel-policy', { as: safety.cookie })
    expect(policy.body.equipmentFactor).toBe(3)
    expect((await api('/api/vessel-policy', { method: 'PUT', as: safety.cookie, body: { ...policy.body, equipmentFactor: 2 } })).status).toBe(400)
    expect((await api('/api/vessel-policy', { method: 'PUT', as: safety.cookie, body: { ...policy.body, equipmentFactor: 4 } })).status).toBe(200)
    const list = await api<FillStationListDto>('/api/fill-stations', { as: safety.cookie })
    expect(list.body.items.find(s => s.id === stationId)).toMatchObject({ lowestPartRatingBar: 60, launchLimitBar: 15, equipmentFactor: 4 })
    expect((await api('/api/vessel-policy', { method: 'PUT', as: safety.cookie, body: { ...policy.body, equipmentFactor: 3 } })).status).toBe(200)
  })
})

describe('launch events', () => {
  it('safety officers and admins create events with stations and staff; members and instructors may not', async () => {
    const res = await api<LaunchEventDto>('/api/events', { method: 'POST', as: safety.cookie, body: eventBody() })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ site: 'Test flat', pressureCapBar: 12, staff: [{ id: instructor.memberId, name: instructor.name }], registeredCount: 0 })
    expect(res.body.stations.map(s => s.id)).toEqual([stationId])
    expect((await api('/api/events', { method: 'POST', as: admin.cookie, body: eventBody() })).status).toBe(201)
    for (const who of [member, instructor]) expect((await api('/api/events', { method: 'POST', as: who.cookie, body: eventBody() })).status).toBe(403)
  })

  it.each([
    ['a member who is not an instructor or safety officer on the staff', () => ({ staffIds: [member.memberId] }), 422],
    ['another club\'s fill station', async () => ({ stationIds: [(await makeFillStation()).stationId] }), 422],
    ['a day in the past', () => ({ heldOn: clubDay(-1) }), 422],
    ['no stations', () => ({ stationIds: [] }), 400],
    ['a cap of 0', () => ({ pressureCap: 0 }), 400],
    ['a cap over 100 bar', () => ({ pressureCap: 1600, unit: 'psi' }), 400],
  ])('refuses %s', async (_label, change, status) => {
    const res = await api('/api/events', { method: 'POST', as: safety.cookie, body: eventBody(await change()) })
    expect(res.status).toBe(status)
  })

  it('lists upcoming and past events, server-paged, for every member', async () => {
    await makeLaunchEvent({ createdBy: safety.memberId, heldOn: clubDay(-5), site: 'Past flat', stationIds: [stationId] })
    const upcoming = await api('/api/events', { as: member.cookie, query: { when: 'upcoming', pageSize: 1 } })
    expect(upcoming.status).toBe(200)
    expect(upcoming.body.items).toHaveLength(1)
    expect(upcoming.body.total).toBeGreaterThanOrEqual(2)
    const past = await api('/api/events', { as: member.cookie, query: { when: 'past' } })
    expect(past.body.items.map((e: { site: string }) => e.site)).toContain('Past flat')
    expect(past.body.items.every((e: { heldOn: string }) => e.heldOn < clubDay(0))).toBe(true)
  })

  it('members register and withdraw until the day before; not on the day, not after a cancellation', async () => {
    const { eventId } = await makeLaunchEvent({ createdBy: safety.memberId, heldOn: clubDay(1), stationIds: [stationId], staffIds: [instructor.memberId] })
    const reg = await api<LaunchEventDto>(`/api/events/${eventId}/registration`, { method: 'POST', as: member.cookie, body: {} })
    expect(reg.status).toBe(200)
    expect(reg.body).toMatchObject({ registered: true, registeredCount: 1 })
    // Twice changes nothing.
    expect((await api<LaunchEventDto>(`/api/events/${eventId}/registration`, { method: 'POST', as: member.cookie, body: {} })).body.registeredCount).toBe(1)
    const out = await api<LaunchEventDto>(`/api/events/${eventId}/registration`, { method: 'DELETE', as: member.cookie })
    expect(out.body).toMatchObject({ registered: false, registeredCount: 0 })
    expect((await api(`/api/events/${eventId}/registration`, { method: 'DELETE', as: member.cookie })).status).toBe(422)

    const { eventId: today } = await makeLaunchEvent({ createdBy: safety.memberId, heldOn: clubDay(0), stationIds: [stationId], registeredIds: [other.memberId] })
    const late = await api(`/api/events/${today}/registration`, { method: 'POST', as: member.cookie, body: {} })
    expect(late.status).toBe(422)
    expect(late.body.data.reasons[0].code).toBe('REGISTRATION_CLOSED')
    expect((await api(`/api/events/${today}/registration`, { method: 'DELETE', as: other.cookie })).status).toBe(422)

    const { eventId: cancelled } = await makeLaunchEvent({ createdBy: safety.memberId, heldOn: clubDay(5), cancelled: true })
    expect((await api(`/api/events/${cancelled}/registration`, { method: 'POST', as: member.cookie, body: {} })).status).toBe(422)
    // Another club's event is not there.
    const { eventId: foreign } = await makeLaunchEvent({ createdBy: (await person((await makeClub({ tagPrefix: 'FOR' })).id)).memberId, heldOn: clubDay(5) })
    expect((await api(`/api/events/${foreign}/registration`, { method: 'POST', as: member.cookie, body: {} })).status).toBe(404)
    expect((await api(`/api/events/${foreign}`, { as: member.cookie })).status).toBe(404)
  })

  it('walk-ins: only the event\'s staff, only on the day', async () => {
    const { eventId } = await makeLaunchEvent({ createdBy: safety.memberId, heldOn: clubDay(0), stationIds: [stationId], staffIds: [instructor.memberId] })
    const body = { membershipId: member.memberId }
    // Safety officer holds fills.record_any but is not on this event's staff.
    const notStaff = await api(`/api/events/${eventId}/walk-ins`, { method: 'POST', as: safety.cookie, body })
    expect(notStaff.status).toBe(422)
    expect(notStaff.body.data.reasons[0].code).toBe('NOT_ON_EVENT_STAFF')
    expect((await api(`/api/events/${eventId}/walk-ins`, { method: 'POST', as: member.cookie, body })).status).toBe(403)
    expect((await api(`/api/events/${eventId}/walk-ins`, { method: 'POST', as: admin.cookie, body })).status).toBe(403)
    const added = await api<LaunchEventDto>(`/api/events/${eventId}/walk-ins`, { method: 'POST', as: instructor.cookie, body })
    expect(added.status).toBe(200)
    expect(added.body.registeredCount).toBe(1)
    const [row] = await sql<{ walk_in: boolean, added_by_membership_id: string }>(
      'SELECT walk_in, added_by_membership_id FROM launch_event_registrations WHERE event_id = $1 AND membership_id = $2', [eventId, member.memberId])
    expect(row).toEqual({ walk_in: true, added_by_membership_id: instructor.memberId })
    // A member of another club: 404.
    const stranger = await person((await makeClub({ tagPrefix: 'STR' })).id)
    expect((await api(`/api/events/${eventId}/walk-ins`, { method: 'POST', as: instructor.cookie, body: { membershipId: stranger.memberId } })).status).toBe(404)

    const { eventId: tomorrow } = await makeLaunchEvent({ createdBy: safety.memberId, heldOn: clubDay(1), stationIds: [stationId], staffIds: [instructor.memberId] })
    const early = await api(`/api/events/${tomorrow}/walk-ins`, { method: 'POST', as: instructor.cookie, body })
    expect(early.status).toBe(422)
    expect(early.body.data.reasons[0].code).toBe('WALK_IN_CLOSED')
  })

  it('moving an event e-mails every registered member once; a withdrawn member is not e-mailed', async () => {
    const a = await person(clubId)
    const b = await person(clubId)
    const gone = await person(clubId)
    const created = await api<LaunchEventDto>('/api/events', { method: 'POST', as: safety.cookie, body: eventBody({ heldOn: clubDay(15) }) })
    const id = created.body.id
    for (const who of [a, b, gone]) expect((await api(`/api/events/${id}/registration`, { method: 'POST', as: who.cookie, body: {} })).status).toBe(200)
    await api(`/api/events/${id}/registration`, { method: 'DELETE', as: gone.cookie })
    // An edit that keeps the day sends nothing.
    expect((await api(`/api/events/${id}`, { method: 'PUT', as: safety.cookie, body: eventBody({ heldOn: clubDay(15), site: 'Renamed flat' }) })).status).toBe(200)
    expect(await noticeCount(a.memberId, 'launch_event_moved')).toBe(0)
    const moved = await api<LaunchEventDto>(`/api/events/${id}`, { method: 'PUT', as: safety.cookie, body: eventBody({ heldOn: clubDay(16), site: 'Renamed flat' }) })
    expect(moved.status).toBe(200)
    expect(moved.body.heldOn).toBe(clubDay(16))
    // Saving the same move again queues nothing more.
    expect((await api(`/api/events/${id}`, { method: 'PUT', as: safety.cookie, body: eventBody({ heldOn: clubDay(16), site: 'Renamed flat' }) })).status).toBe(200)
    expect([await noticeCount(a.memberId, 'launch_event_moved'), await noticeCount(b.memberId, 'launch_event_moved'), await noticeCount(gone.memberId, 'launch_event_moved')]).toEqual([1, 1, 0])
    const [mail] = await sql<{ subject: string, text_body: string }>(`SELECT subject, text_body FROM notices WHERE membership_id = $1 AND kind = 'launch_event_moved'`, [a.memberId])
    expect(mail!.subject).toContain('Renamed flat')
    expect(mail!.text_body).toContain(`/events/${id}`)
    expect((await api(`/api/events/${id}`, { method: 'PUT', as: instructor.cookie, body: eventBody() })).status).toBe(403)
  })

  it('cancelling e-mails every registered member once with the reason; a cancelled or past event is not changed again', async () => {
    const a = await person(clubId)
    const { eventId } = await makeLaunchEvent({ createdBy: safety.memberId, heldOn: clubDay(9), stationIds: [stationId], staffIds: [instructor.memberId], registeredIds: [a.memberId] })
    expect((await api(`/api/events/${eventId}/cancel`, { method: 'POST', as: safety.cookie, body: {} })).status).toBe(400)
    expect((await api(`/api/events/${eventId}/cancel`, { method: 'POST', as: member.cookie, body: { reason: 'Wind' } })).status).toBe(403)
    const res = await api<LaunchEventDto>(`/api/events/${eventId}/cancel`, { method: 'POST', as: admin.cookie, body: { reason: 'Gale forecast over the flats' } })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ cancelled: true, cancelReason: 'Gale forecast over the flats' })
    const again = await api(`/api/events/${eventId}/cancel`, { method: 'POST', as: admin.cookie, body: { reason: 'Twice' } })
    expect(again.status).toBe(422)
    expect(await noticeCount(a.memberId, 'launch_event_cancelled')).toBe(1)
    const [mail] = await sql<{ text_body: string }>(`SELECT text_body FROM notices WHERE membership_id = $1 AND kind = 'launch_event_cancelled'`, [a.memberId])
    expect(mail!.text_body).toContain('Gale forecast over the flats')
    const { eventId: past } = await makeLaunchEvent({ createdBy: safety.memberId, heldOn: clubDay(-3) })
    expect((await api(`/api/events/${past}`, { method: 'PUT', as: safety.cookie, body: eventBody() })).status).toBe(422)
    expect((await api(`/api/events/${past}/cancel`, { method: 'POST', as: safety.cookie, body: { reason: 'Late' } })).status).toBe(422)
  })
})

describe('the fill log, its CSV and members\' history', () => {
  let eventId = ''
  let vesselId = ''
  let tag = ''

  beforeAll(async () => {
    ({ eventId } = await makeLaunchEvent({ createdBy: safety.memberId, heldOn: clubDay(-2), site: 'Log flat', stationIds: [stationId], staffIds: [instructor.memberId], registeredIds: [member.memberId] }))
    ;({ vesselId, tag } = await makeVessel({ ownerId: member.memberId, state: 'in_service' }))
    await makeFill({ eventId, stationId, memberId: member.memberId, vesselId, recordedBy: instructor.memberId, pressureBar: 7 })
    await makeFill({ eventId, stationId, memberId: member.memberId, vesselId, recordedBy: instructor.memberId, pressureBar: 14,
      reasons: [{ code: 'TIER_CAP_EXCEEDED', message: 'The pressure is above what the member\'s tier allows.' }, { code: 'EVENT_CAP_EXCEEDED', message: 'The pressure is above the event\'s pressure cap.' }] })
  })

  it('staff and officers page and sort the fills and refusals; members may not', async () => {
    const res = await api(`/api/events/${eventId}/fills`, { as: instructor.cookie, query: { sort: 'pressure', dir: 'desc' } })
    expect(res.status).toBe(200)
    expect(res.body.total).toBe(2)
    expect(res.body.items.map((f: { pressureBar: number, allowed: boolean }) => [f.pressureBar, f.allowed])).toEqual([[14, false], [7, true]])
    expect(res.body.items[0].reasons.map((r: { code: string }) => r.code)).toEqual(['TIER_CAP_EXCEEDED', 'EVENT_CAP_EXCEEDED'])
    const refused = await api(`/api/events/${eventId}/fills`, { as: admin.cookie, query: { outcome: 'refused' } })
    expect(refused.body.items).toHaveLength(1)
    const paged = await api(`/api/events/${eventId}/fills`, { as: safety.cookie, query: { pageSize: 1, page: 2, sort: 'pressure', dir: 'asc' } })
    expect(paged.body.items.map((f: { pressureBar: number }) => f.pressureBar)).toEqual([14])
    expect((await api(`/api/events/${eventId}/fills`, { as: member.cookie })).status).toBe(403)
  })

  it('exports the same rows as CSV', async () => {
    const res = await api<string>(`/api/events/${eventId}/fills/export`, { as: safety.cookie, query: { sort: 'pressure', dir: 'asc' } })
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toMatch(/text\/csv/)
    expect(res.headers.get('content-disposition')).toMatch(/attachment/)
    const lines = res.body.trim().split('\r\n')
    expect(lines[0]).toBe('recorded_at,held_on,member,vessel,station,pressure_bar,entered,water_l,outcome,reasons,permitted_max_bar,limited_by,standoff_m,recorded_by,supervisor')
    expect(lines).toHaveLength(3)
    expect(lines[1]).toContain(`,${member.name},${tag},`)
    expect(lines[1]).toContain(',7.00,7 bar,')
    expect(lines[1]).toContain(',allowed,,')
    expect(lines[2]).toContain(',refused,TIER_CAP_EXCEEDED EVENT_CAP_EXCEEDED,')
    expect((await api(`/api/events/${eventId}/fills/export`, { as: member.cookie })).status).toBe(403)
  })

  it('a member sees their own fills, allowed and refused with reasons, and nobody else\'s', async () => {
    const res = await api('/api/me/fills', { as: member.cookie })
    expect(res.status).toBe(200)
    expect(res.body.total).toBe(2)
    expect(res.body.items.map((f: { vesselTag: string, eventSite: string }) => [f.vesselTag, f.eventSite])).toEqual([[tag, 'Log flat'], [tag, 'Log flat']])
    expect(res.body.items.find((f: { allowed: boolean }) => !f.allowed).reasons).toHaveLength(2)
    expect((await api('/api/me/fills', { as: other.cookie })).body.total).toBe(0)
    expect((await api('/api/me/fills', { as: member.cookie, query: { pageSize: 1 } })).body.items).toHaveLength(1)
  })
})

describe('the launch-day roster', () => {
  it('lists every registered member with tier, fill limit, vessels in service and what is missing', async () => {
    const ready = await person(clubId)
    const missing = await person(clubId)
    const junior = await person(clubId)
    await setMembership(junior.memberId, { birthDate: clubDay(-15 * 365), guardianConsentAt: NOW })
    await setMembership(missing.memberId, { paidThrough: clubDay(-5) })
    // The waiver is published after the club's members were made: only `ready` and `junior` accept it.
    const { waiverId } = await makeWaiver({ clubId })
    for (const who of [ready, junior]) await acceptWaiver({ memberId: who.memberId, waiverId })
    for (const who of [ready, junior]) await makeTrainingRecord({ memberId: who.memberId, course: 'pressure_safety', trainerId: instructor.memberId, trainedOn: clubDay(-30) })
    await makeTier({ memberId: ready.memberId, rank: 3, assessorId: safety.memberId })
    await makeTier({ memberId: ready.memberId, rank: 2, assessorId: safety.memberId })
    await makeTier({ memberId: junior.memberId, rank: 2, assessorId: safety.memberId })
    await makeTier({ memberId: missing.memberId, rank: 2, assessorId: safety.memberId, signedOn: clubDay(-800), expiresOn: clubDay(-1) })
    const inService = await makeVessel({ ownerId: ready.memberId, state: 'in_service' })
    await makeProofTest({ vesselId: inService.vesselId, witnessId: instructor.memberId, testedOn: clubDay(-20), pressureBar: 15 })
    const retestDue = await makeVessel({ ownerId: ready.memberId, state: 'in_service' })
    await makeProofTest({ vesselId: retestDue.vesselId, witnessId: instructor.memberId, testedOn: clubDay(-400), pressureBar: 15 })
    const { eventId } = await makeLaunchEvent({ createdBy: safety.memberId, heldOn: clubDay(3), pressureCapBar: 12, stationIds: [stationId],
      staffIds: [instructor.memberId], registeredIds: [ready.memberId, missing.memberId, junior.memberId] })

    const res = await api<LaunchRosterDto>(`/api/events/${eventId}/roster`, { as: instructor.cookie })
    expect(res.status).toBe(200)
    const row = (id: string) => res.body.rows.find(r => r.member.id === id)!
    expect(res.body.rows).toHaveLength(3)
    // T3 (17 bar) held: the event cap of 12 bar sets what they may fill to; the retest-due vessel is not listed.
    expect(row(ready.memberId)).toMatchObject({ tierRank: 3, tierCapBar: 17, fillLimitBar: 12, junior: false, missing: { waiver: false, course: false, dues: false } })
    expect(row(ready.memberId).vessels).toEqual([{ id: inService.vesselId, tag: inService.tag, name: expect.any(String), ratedFillBar: 10 }])
    // A junior holding T2 is held to the junior cap, T1 (6 bar).
    expect(row(junior.memberId)).toMatchObject({ tierRank: 1, tierCapBar: 6, fillLimitBar: 6, junior: true })
    // Expired tier, dues run out, no course, waiver not accepted.
    expect(row(missing.memberId)).toMatchObject({ tierRank: null, fillLimitBar: 0, vessels: [], missing: { waiver: true, course: true, dues: true } })
    expect((await api(`/api/events/${eventId}/roster`, { as: member.cookie })).status).toBe(403)
  })
})
