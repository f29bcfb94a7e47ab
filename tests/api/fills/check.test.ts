import { describe, it, expect, beforeAll } from 'vitest'
import { sql } from '../../support/db'
import { clubDay, makeFillStation, makeTier, makeTrainingRecord } from '../../support/factories'
import { PA_PER_BAR, PA_PER_PSI } from '../../../shared/utils/units'
import { check, codesOf, fillBody, fillClub, filler, otherEvent, person, type FillClub, type Filler } from './fill-support'

/**
 * POST /api/fills/check: the gate's answer, 200 whether yes or no, writing nothing. Each reason code
 * alone where it can occur alone; the ones that always come together are named with their partner.
 */
let club: FillClub
let member: Filler

beforeAll(async () => {
  club = await fillClub()
  member = await filler(club)
})

const fillCount = async (vesselId: string) => (await sql<{ n: number }>('SELECT count(*)::int AS n FROM fills WHERE vessel_id = $1', [vesselId]))[0]!.n

describe('an allowed check', () => {
  it('a T2 member\'s own fill at 8 bar: allowed, 10 bar limited by the tier (tied with the vessel\'s rated fill), with the air charge', async () => {
    const res = await check(member.cookie, fillBody(club, member))
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body).toMatchObject({ allowed: true, reasons: [], requested: { pressureBar: 8 }, permittedMaxBar: 10, limitingFactor: 'TIER' })
    expect(res.body.airCharge.storedEnergyJ).toBeGreaterThan(0)
    expect(res.body.airCharge.tntEquivalentKg).toBeGreaterThan(0)
    expect(res.body.airCharge.minimumDistanceM).toBeGreaterThan(0)
  })

  it('a refusal is 200 too, and the check writes nothing', async () => {
    const before = await fillCount(member.vesselId)
    const res = await check(member.cookie, fillBody(club, member, { pressure: 12 }))
    expect(res.status).toBe(200)
    expect(res.body.allowed).toBe(false)
    expect(codesOf(res.body)).toEqual(['TIER_CAP_EXCEEDED', 'RATED_FILL_EXCEEDED'])
    expect(await fillCount(member.vesselId)).toBe(before)
  })
})

describe('each reason alone', () => {
  it('MEMBERSHIP_NOT_ACTIVE: dues ran out five days ago (grace)', async () => {
    const m = await filler(club, { paidDays: -5 })
    expect(codesOf((await check(m.cookie, fillBody(club, m))).body)).toEqual(['MEMBERSHIP_NOT_ACTIVE'])
  })

  it('WAIVER_NOT_ACCEPTED: the club\'s current waiver not accepted', async () => {
    const m = await filler(club, { acceptWaiver: false })
    expect(codesOf((await check(m.cookie, fillBody(club, m))).body)).toEqual(['WAIVER_NOT_ACCEPTED'])
  })

  it('GUARDIAN_CONSENT_MISSING: a T1 junior supervised by the instructor at 5 bar, no consent', async () => {
    const m = await filler(club, { rank: 1, birthDate: clubDay(-15 * 365) })
    const res = await check(club.instructor.cookie, fillBody(club, m, { pressure: 5, supervised: true }))
    expect(codesOf(res.body)).toEqual(['GUARDIAN_CONSENT_MISSING'])
  })

  it('NO_VALID_TIER (the permitted maximum 0, set by the tier)', async () => {
    const m = await filler(club, { rank: null })
    const res = await check(m.cookie, fillBody(club, m))
    expect(res.body).toMatchObject({ permittedMaxBar: 0, limitingFactor: 'TIER' })
    expect(codesOf(res.body)).toEqual(['NO_VALID_TIER'])
  })

  it('NO_VALID_TIER when the only tier has expired or is suspended; a lower valid tier is fallen back to', async () => {
    const expired = await filler(club, { rank: null })
    await makeTier({ memberId: expired.memberId, rank: 2, signedOn: clubDay(-800), expiresOn: clubDay(-1) })
    expect(codesOf((await check(expired.cookie, fillBody(club, expired))).body)).toEqual(['NO_VALID_TIER'])
    const fallBack = await filler(club, { rank: 1 })
    await makeTier({ memberId: fallBack.memberId, rank: 2, suspended: true })
    const res = await check(fallBack.cookie, fillBody(club, fallBack, { pressure: 5 }))
    expect(res.body).toMatchObject({ allowed: true, permittedMaxBar: 6, limitingFactor: 'TIER' })
  })

  it('TIER_CAP_EXCEEDED: a T2 member at 11 bar with a vessel rated 12', async () => {
    const m = await filler(club, { proofBar: 18 })
    const res = await check(m.cookie, fillBody(club, m, { pressure: 11 }))
    expect(codesOf(res.body)).toEqual(['TIER_CAP_EXCEEDED'])
  })

  it('COURSE_NOT_CURRENT: pressure safety never taken, or flagged for retraining, or expired', async () => {
    const never = await filler(club, { courses: ['rig_operator'] })
    const res = await check(never.cookie, fillBody(club, never))
    expect(codesOf(res.body)).toEqual(['COURSE_NOT_CURRENT'])
    expect(res.body.reasons[0]!.message).toMatch(/Pressure safety/)
    const flagged = await filler(club, { courses: ['rig_operator'] })
    await makeTrainingRecord({ memberId: flagged.memberId, course: 'pressure_safety', trainerId: club.instructor.memberId, trainedOn: clubDay(-5), retrainingReason: 'skill_not_retained' })
    expect(codesOf((await check(flagged.cookie, fillBody(club, flagged))).body)).toEqual(['COURSE_NOT_CURRENT'])
    const expired = await filler(club, { courses: ['rig_operator'] })
    await makeTrainingRecord({ memberId: expired.memberId, course: 'pressure_safety', trainerId: club.instructor.memberId, trainedOn: clubDay(-400), expiresOn: clubDay(-1) })
    expect(codesOf((await check(expired.cookie, fillBody(club, expired))).body)).toEqual(['COURSE_NOT_CURRENT'])
  })

  it('VESSEL_NOT_IN_SERVICE: quarantined (its rated fill counts as 0)', async () => {
    const m = await filler(club, { vesselState: 'quarantined' })
    const res = await check(m.cookie, fillBody(club, m))
    expect(res.body).toMatchObject({ permittedMaxBar: 0, limitingFactor: 'VESSEL_RATING' })
    expect(codesOf(res.body)).toEqual(['VESSEL_NOT_IN_SERVICE'])
  })

  it('PROOF_LAPSED (by time): a single bottle proved 400 days ago', async () => {
    const m = await filler(club, { proofDaysAgo: 400 })
    expect(codesOf((await check(m.cookie, fillBody(club, m))).body)).toEqual(['PROOF_LAPSED'])
  })

  it('RATED_FILL_EXCEEDED: a T3 member at 11 bar, the vessel rated 10 (limited by the vessel)', async () => {
    const m = await filler(club, { rank: 3, courses: ['pressure_safety', 'rig_operator', 'composite_ppe'] })
    const res = await check(m.cookie, fillBody(club, m, { pressure: 11 }))
    expect(res.body).toMatchObject({ permittedMaxBar: 10, limitingFactor: 'VESSEL_RATING' })
    expect(codesOf(res.body)).toEqual(['RATED_FILL_EXCEEDED'])
  })

  it('EVENT_CAP_EXCEEDED: an event capped at 7 bar (limited by the event cap)', async () => {
    const eventId = await otherEvent(club, { pressureCapBar: 7 })
    const res = await check(member.cookie, fillBody(club, member, { eventId }))
    expect(res.body).toMatchObject({ permittedMaxBar: 7, limitingFactor: 'EVENT_CAP' })
    expect(codesOf(res.body)).toEqual(['EVENT_CAP_EXCEEDED'])
  })

  it('EQUIPMENT_RATING_EXCEEDED: a launcher whose lowest rated part is 21 bar launches at 7 (the factor 3)', async () => {
    const { stationId } = await makeFillStation({ clubId: club.clubId, lowestPartRatingBar: 21 })
    const eventId = await otherEvent(club, { stationIds: [stationId] })
    const res = await check(member.cookie, fillBody(club, member, { eventId, stationId }))
    expect(res.body).toMatchObject({ permittedMaxBar: 7, limitingFactor: 'EQUIPMENT_RATING' })
    expect(codesOf(res.body)).toEqual(['EQUIPMENT_RATING_EXCEEDED'])
  })

  it('GAUGE_CALIBRATION_DUE: calibrated 13 months ago every 12', async () => {
    const { stationId } = await makeFillStation({ clubId: club.clubId, gaugeCalibratedOn: clubDay(-400), gaugeIntervalMonths: 12 })
    const eventId = await otherEvent(club, { stationIds: [stationId] })
    expect(codesOf((await check(member.cookie, fillBody(club, member, { eventId, stationId }))).body)).toEqual(['GAUGE_CALIBRATION_DUE'])
  })

  it('METAL_IN_PRESSURE_PATH at a competition event (not at an ordinary one)', async () => {
    const m = await filler(club, { metalInPressurePath: true })
    const eventId = await otherEvent(club, { competition: true })
    expect(codesOf((await check(m.cookie, fillBody(club, m, { eventId }))).body)).toEqual(['METAL_IN_PRESSURE_PATH'])
    expect(codesOf((await check(m.cookie, fillBody(club, m))).body)).toEqual([])
  })

  it('JUNIOR_UNSUPERVISED: a consented T1 junior filling their own at 5 bar', async () => {
    const m = await filler(club, { rank: 1, birthDate: clubDay(-15 * 365), guardianConsent: true })
    expect(codesOf((await check(m.cookie, fillBody(club, m, { pressure: 5 }))).body)).toEqual(['JUNIOR_UNSUPERVISED'])
  })

  it('NOT_ON_EVENT_STAFF: an instructor not on the event\'s staff checking another member\'s fill', async () => {
    const outsider = await person(club.clubId, ['instructor'])
    expect(codesOf((await check(outsider.cookie, fillBody(club, member))).body)).toEqual(['NOT_ON_EVENT_STAFF'])
  })

  it('STATION_NOT_AT_EVENT: a launcher the event does not use', async () => {
    const { stationId } = await makeFillStation({ clubId: club.clubId })
    expect(codesOf((await check(member.cookie, fillBody(club, member, { stationId }))).body)).toEqual(['STATION_NOT_AT_EVENT'])
  })

  it('EVENT_NOT_TODAY for a past event; a check of a future event is fine', async () => {
    const past = await otherEvent(club, { heldOn: clubDay(-1) })
    expect(codesOf((await check(member.cookie, fillBody(club, member, { eventId: past }))).body)).toEqual(['EVENT_NOT_TODAY'])
    const future = await otherEvent(club, { heldOn: clubDay(7) })
    expect((await check(member.cookie, fillBody(club, member, { eventId: future }))).body).toMatchObject({ allowed: true, reasons: [] })
  })
})

describe('reasons that come together', () => {
  it('a member with no birth date counts as a junior: GUARDIAN_CONSENT_MISSING + JUNIOR_UNSUPERVISED on their own fill; allowed when consented and supervised', async () => {
    const m = await filler(club, { rank: 1, birthDate: null })
    expect(codesOf((await check(m.cookie, fillBody(club, m, { pressure: 5 }))).body)).toEqual(['GUARDIAN_CONSENT_MISSING', 'JUNIOR_UNSUPERVISED'])
    const consented = await filler(club, { rank: 1, birthDate: null, guardianConsent: true })
    expect((await check(club.instructor.cookie, fillBody(club, consented, { pressure: 5, supervised: true }))).body).toMatchObject({ allowed: true })
  })

  it('a member with no tier (or only T0) filling their own: NO_VALID_TIER (T0 allows nothing, alone: TIER_CAP_EXCEEDED)', async () => {
    const t0 = await filler(club, { rank: 0 })
    const res = await check(t0.cookie, fillBody(club, t0))
    expect(res.body).toMatchObject({ permittedMaxBar: 0, limitingFactor: 'TIER' })
    expect(codesOf(res.body)).toEqual(['TIER_CAP_EXCEEDED'])
  })
})

describe('the limiting factor on ties', () => {
  it('vessel rating and event cap both 9 bar: VESSEL_RATING', async () => {
    const m = await filler(club, { rank: 3, courses: ['pressure_safety', 'rig_operator', 'composite_ppe'], proofBar: 13.5 })
    const eventId = await otherEvent(club, { pressureCapBar: 9 })
    expect((await check(m.cookie, fillBody(club, m, { eventId }))).body).toMatchObject({ allowed: true, permittedMaxBar: 9, limitingFactor: 'VESSEL_RATING' })
  })

  it('event cap and launcher both 7 bar: EVENT_CAP', async () => {
    const { stationId } = await makeFillStation({ clubId: club.clubId, lowestPartRatingBar: 21 })
    const eventId = await otherEvent(club, { pressureCapBar: 7, stationIds: [stationId] })
    expect((await check(member.cookie, fillBody(club, member, { eventId, stationId, pressure: 7 }))).body).toMatchObject({ allowed: true, permittedMaxBar: 7, limitingFactor: 'EVENT_CAP' })
  })
})

describe('supervised fills', () => {
  it('the instructor on the staff supervises a T1 member at 8 bar (one tier up): allowed', async () => {
    const m = await filler(club, { rank: 1 })
    expect((await check(club.instructor.cookie, fillBody(club, m, { supervised: true }))).body).toMatchObject({ allowed: true, permittedMaxBar: 10 })
    expect(codesOf((await check(m.cookie, fillBody(club, m))).body)).toEqual(['TIER_CAP_EXCEEDED'])
  })

  it('a member asking for a supervised fill of their own is refused SUPERVISOR_NOT_QUALIFIED, whatever their role', async () => {
    expect(codesOf((await check(member.cookie, fillBody(club, member, { supervised: true }))).body)).toEqual(['SUPERVISOR_NOT_QUALIFIED'])
    const ownVessel = await filler(club, { rank: 3, roles: ['instructor'], courses: ['pressure_safety', 'rig_operator', 'composite_ppe'] })
    expect(codesOf((await check(ownVessel.cookie, fillBody(club, ownVessel, { supervised: true }))).body)).toEqual(['SUPERVISOR_NOT_QUALIFIED'])
  })

  it('an under-qualified supervisor (T1 instructor, the fill needs T2) is refused', async () => {
    const weak = await person(club.clubId, ['instructor'])
    await makeTier({ memberId: weak.memberId, rank: 1 })
    const eventId = await otherEvent(club, { staffIds: [club.instructor.memberId, weak.memberId] })
    const m = await filler(club, { rank: 1 })
    expect(codesOf((await check(weak.cookie, fillBody(club, m, { eventId, supervised: true }))).body)).toEqual(['SUPERVISOR_NOT_QUALIFIED'])
  })

  it('a junior above the junior cap is refused, even supervised (permitted 6 bar)', async () => {
    const junior = await filler(club, { rank: 1, birthDate: clubDay(-15 * 365), guardianConsent: true })
    const res = await check(club.instructor.cookie, fillBody(club, junior, { supervised: true, pressure: 7 }))
    expect(res.body).toMatchObject({ permittedMaxBar: 6, limitingFactor: 'TIER' })
    expect(codesOf(res.body)).toEqual(['TIER_CAP_EXCEEDED'])
  })
})

describe('pressures in psi, kPa and MPa, compared at full precision', () => {
  const capPsi = 10 * PA_PER_BAR / PA_PER_PSI
  it.each([
    ['1000 kPa (exactly the 10 bar cap)', 1000, 'kPa', true],
    ['1 MPa', 1, 'MPa', true],
    ['10 bar in psi at full precision', capPsi, 'psi', true],
    ['one psi above the cap', capPsi + 1, 'psi', false],
    ['1000.01 kPa', 1000.01, 'kPa', false],
  ] as const)('%s', async (_, pressure, unit, allowed) => {
    const res = await check(member.cookie, fillBody(club, member, { pressure, unit }))
    expect(res.body.allowed, JSON.stringify(res.body.reasons)).toBe(allowed)
    if (!allowed) expect(codesOf(res.body)).toEqual(['TIER_CAP_EXCEEDED', 'RATED_FILL_EXCEEDED'])
  })
})

describe('bad input and the wrong callers', () => {
  it('pressure 0: 400', async () => {
    const res = await check(member.cookie, fillBody(club, member, { pressure: 0 }))
    expect(res.status).toBe(400)
    expect(res.body.data.fields.pressure).toMatch(/more than 0/)
  })

  it('water at or above the vessel\'s volume: 400 with the field', async () => {
    for (const waterVolumeL of [2, 2.5]) {
      const res = await check(member.cookie, fillBody(club, member, { waterVolumeL }))
      expect(res.status).toBe(400)
      expect(res.body.data.fields.waterVolumeL).toMatch(/less than the vessel's volume/)
    }
  })

  it('someone else\'s vessel: 404', async () => {
    const other = await filler(club)
    expect((await check(member.cookie, fillBody(club, member, { vesselId: other.vesselId }))).status).toBe(404)
    // Staff asking for the right member with the wrong vessel: 404 too.
    expect((await check(club.instructor.cookie, fillBody(club, member, { vesselId: other.vesselId }))).status).toBe(404)
  })

  it('another member\'s id as a plain member: 403', async () => {
    const other = await filler(club)
    expect((await check(member.cookie, fillBody(club, other))).status).toBe(403)
  })

  it('an unknown event, station or member: 404; a cancelled event: 409', async () => {
    const unknown = '00000000-0000-4000-8000-000000000000'
    expect((await check(member.cookie, fillBody(club, member, { eventId: unknown }))).status).toBe(404)
    expect((await check(member.cookie, fillBody(club, member, { stationId: unknown }))).status).toBe(404)
    expect((await check(club.instructor.cookie, fillBody(club, member, { memberId: unknown }))).status).toBe(404)
    const cancelled = await otherEvent(club, { cancelled: true })
    const res = await check(member.cookie, fillBody(club, member, { eventId: cancelled }))
    expect(res.status).toBe(409)
    expect(res.body.message).toMatch(/cancelled/)
  })

  it('another club\'s event or station is unknown: 404', async () => {
    const elsewhere = await fillClub()
    expect((await check(member.cookie, fillBody(club, member, { eventId: elsewhere.eventId }))).status).toBe(404)
    expect((await check(member.cookie, fillBody(club, member, { stationId: elsewhere.stationId }))).status).toBe(404)
  })
})
