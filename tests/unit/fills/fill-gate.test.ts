import { describe, it, expect } from 'vitest'
import { decideFill, exceedsBar, permittedMaximum, reachableRank, tierNeededFor, type FillGateFacts } from '../../../shared/utils/fill-gate'
import { FILL_REASON_CODES, type FillReasonCode } from '../../../shared/utils/fill-reasons'
import { STARTING_TIER_LEVELS } from '../../../shared/utils/tier-rules'
import { PA_PER_BAR, PA_PER_PSI, pressureToPa } from '../../../shared/utils/units'

const TODAY = '2025-06-14'
const TIERS = STARTING_TIER_LEVELS.map(t => ({ rank: t.rank, fillCapBar: t.fillCapBar, requiredCourseCodes: t.requiredCourseCodes }))

/** An adult T2 member filling their own in-service vessel (rated 12 bar) at 8 bar at today's event: allowed. */
function facts(o: { [K in keyof FillGateFacts]?: Partial<FillGateFacts[K]> | FillGateFacts[K] } = {}): FillGateFacts {
  const base: FillGateFacts = {
    requestedBar: 8,
    today: TODAY,
    recording: true,
    supervised: false,
    member: { status: 'active', waiverAccepted: true, junior: false, guardianConsent: false, validRank: 2 },
    tiers: TIERS,
    juniorCapRank: 1,
    courses: {
      pressure_safety: { name: 'Pressure safety', current: true },
      rig_operator: { name: 'Rig operator', current: true },
      composite_ppe: { name: 'Composite PPE', current: true },
      range_safety: { name: 'Range safety', current: true },
    },
    vessel: { state: 'in_service', ratedFillBar: 12, metalInPressurePath: false },
    event: { heldOn: TODAY, pressureCapBar: 20, competition: false },
    station: { atEvent: true, launchLimitBar: 25, gaugeCurrentThrough: '2025-12-31' },
    caller: { isMember: true, onEventStaff: false, instructor: false, validRank: 2 },
  }
  const merged = { ...base } as Record<string, unknown>
  for (const [k, v] of Object.entries(o)) {
    const b = (base as unknown as Record<string, unknown>)[k]
    merged[k] = b && typeof b === 'object' && !Array.isArray(b) && v && typeof v === 'object' && !Array.isArray(v) ? { ...b, ...v } : v
  }
  return merged as unknown as FillGateFacts
}

const codes = (f: FillGateFacts) => decideFill(f).reasons.map(r => r.code)

describe('decideFill', () => {
  it('allows the base fill, limited by the tier (10 bar)', () => {
    expect(decideFill(facts())).toEqual({ allowed: true, permittedMaxBar: 10, limitingFactor: 'TIER', reasons: [], neededRank: 2 })
  })

  const alone: [FillReasonCode, Parameters<typeof facts>[0]][] = [
    ['MEMBERSHIP_NOT_ACTIVE', { member: { status: 'grace' } }],
    ['WAIVER_NOT_ACCEPTED', { member: { waiverAccepted: false } }],
    // A junior with consent, supervised by a qualified instructor, at the junior cap: only the consent can fail alone.
    ['GUARDIAN_CONSENT_MISSING', { requestedBar: 5, supervised: true, member: { junior: true, guardianConsent: false, validRank: 1 }, caller: { isMember: false, onEventStaff: true, instructor: true, validRank: 3 } }],
    ['NO_VALID_TIER', { member: { validRank: null } }],
    ['TIER_CAP_EXCEEDED', { requestedBar: 11 }],
    ['COURSE_NOT_CURRENT', { courses: { pressure_safety: { name: 'Pressure safety', current: false } } }],
    ['VESSEL_NOT_IN_SERVICE', { vessel: { state: 'quarantined' } }],
    ['PROOF_LAPSED', { vessel: { state: 'retest_due', ratedFillBar: null } }],
    ['RATED_FILL_EXCEEDED', { vessel: { ratedFillBar: 7 } }],
    ['EVENT_CAP_EXCEEDED', { event: { pressureCapBar: 7 } }],
    ['EQUIPMENT_RATING_EXCEEDED', { station: { launchLimitBar: 7 } }],
    ['GAUGE_CALIBRATION_DUE', { station: { gaugeCurrentThrough: '2025-06-13' } }],
    ['METAL_IN_PRESSURE_PATH', { event: { competition: true }, vessel: { metalInPressurePath: true } }],
    ['JUNIOR_UNSUPERVISED', { requestedBar: 5, member: { junior: true, guardianConsent: true, validRank: 1 } }],
    ['SUPERVISOR_NOT_QUALIFIED', { supervised: true }],
    ['NOT_ON_EVENT_STAFF', { caller: { isMember: false, onEventStaff: false, instructor: true, validRank: 3 } }],
    ['STATION_NOT_AT_EVENT', { station: { atEvent: false } }],
    ['EVENT_NOT_TODAY', { event: { heldOn: '2025-06-15' } }],
  ]

  it('covers every reason code', () => {
    expect(alone.map(([c]) => c).sort()).toEqual([...FILL_REASON_CODES].sort())
  })

  it.each(alone)('%s alone', (code, o) => {
    const d = decideFill(facts(o))
    expect(d.reasons.map(r => r.code)).toEqual([code])
    expect(d.allowed).toBe(false)
    expect(d.reasons[0]!.message.length).toBeGreaterThan(20)
  })

  it('lists every failed rule, in code order', () => {
    const all = codes(facts({
      member: { status: 'lapsed', waiverAccepted: false, validRank: null },
      vessel: { state: 'retest_due', ratedFillBar: null, metalInPressurePath: true },
      event: { pressureCapBar: 5, competition: true, heldOn: '2025-06-01' },
      station: { atEvent: false, launchLimitBar: 4, gaugeCurrentThrough: '2025-01-01' },
      courses: { pressure_safety: { name: 'Pressure safety', current: false } },
      caller: { isMember: false, onEventStaff: false, instructor: false, validRank: null },
    }))
    expect(all).toEqual(['MEMBERSHIP_NOT_ACTIVE', 'WAIVER_NOT_ACCEPTED', 'NO_VALID_TIER', 'COURSE_NOT_CURRENT', 'PROOF_LAPSED',
      'EVENT_CAP_EXCEEDED', 'EQUIPMENT_RATING_EXCEEDED', 'GAUGE_CALIBRATION_DUE', 'METAL_IN_PRESSURE_PATH', 'NOT_ON_EVENT_STAFF', 'STATION_NOT_AT_EVENT', 'EVENT_NOT_TODAY'])
  })

  it('names the lapsed courses of the tier the fill relies on (a T2 member at 5 bar relies on T1: pressure safety only)', () => {
    const lapsed = { pressure_safety: { name: 'Pressure safety', current: false }, rig_operator: { name: 'Rig operator', current: false } }
    const d = decideFill(facts({ requestedBar: 5, courses: lapsed }))
    expect(d.reasons).toEqual([expect.objectContaining({ code: 'COURSE_NOT_CURRENT', message: expect.stringMatching(/: Pressure safety\.$/) })])
    const at8 = decideFill(facts({ requestedBar: 8, courses: lapsed }))
    expect(at8.reasons.map(r => r.message)).toEqual([expect.stringMatching(/: Pressure safety, Rig operator\.$/)])
    const rigOnly = decideFill(facts({ requestedBar: 5, courses: { rig_operator: { name: 'Rig operator', current: false } } }))
    expect(rigOnly.allowed).toBe(true)
  })

  it('a member without a birth date counts as a junior: without consent and unsupervised, both reasons come together', () => {
    expect(codes(facts({ requestedBar: 5, member: { junior: true, guardianConsent: false, validRank: 1 } }))).toEqual(['GUARDIAN_CONSENT_MISSING', 'JUNIOR_UNSUPERVISED'])
  })

  it('a recording needs the event today; a check accepts today or later, never earlier', () => {
    expect(codes(facts({ recording: false, event: { heldOn: '2025-07-01' } }))).toEqual([])
    expect(codes(facts({ recording: true, event: { heldOn: '2025-07-01' } }))).toEqual(['EVENT_NOT_TODAY'])
    expect(codes(facts({ recording: false, event: { heldOn: '2025-06-13' } }))).toEqual(['EVENT_NOT_TODAY'])
  })

  it('the gauge is current through its date inclusive', () => {
    expect(codes(facts({ station: { gaugeCurrentThrough: TODAY } }))).toEqual([])
  })
})

describe('the permitted maximum and its limiting factor', () => {
  it.each([
    ['TIER', {}, 10],
    ['VESSEL_RATING', { vessel: { ratedFillBar: 9 } }, 9],
    ['EVENT_CAP', { event: { pressureCapBar: 8.5 } }, 8.5],
    ['EQUIPMENT_RATING', { station: { launchLimitBar: 75 / 9 } }, 75 / 9],
  ] as const)('%s sets it', (factor, o, max) => {
    const d = decideFill(facts(o as Parameters<typeof facts>[0]))
    expect(d).toMatchObject({ limitingFactor: factor, permittedMaxBar: max, allowed: true })
  })

  it.each([
    ['TIER over all three', { vessel: { ratedFillBar: 10 }, event: { pressureCapBar: 10 }, station: { launchLimitBar: 10 } }, 'TIER'],
    ['VESSEL_RATING over EVENT_CAP and EQUIPMENT_RATING', { vessel: { ratedFillBar: 9 }, event: { pressureCapBar: 9 }, station: { launchLimitBar: 9 } }, 'VESSEL_RATING'],
    ['EVENT_CAP over EQUIPMENT_RATING', { event: { pressureCapBar: 9 }, station: { launchLimitBar: 9 } }, 'EVENT_CAP'],
  ] as const)('a tie goes %s', (_, o, factor) => {
    expect(decideFill(facts(o as Parameters<typeof facts>[0])).limitingFactor).toBe(factor)
  })

  it('is 0, set by the tier, when no tier is valid, whatever else fails', () => {
    expect(decideFill(facts({ member: { validRank: null }, event: { pressureCapBar: 5 } }))).toMatchObject({ permittedMaxBar: 0, limitingFactor: 'TIER' })
  })

  it('a vessel not in service has a rated fill of 0 (and no RATED_FILL_EXCEEDED)', () => {
    const d = decideFill(facts({ vessel: { state: 'awaiting_proof', ratedFillBar: 12 } }))
    expect(d).toMatchObject({ permittedMaxBar: 0, limitingFactor: 'VESSEL_RATING' })
    expect(d.reasons.map(r => r.code)).toEqual(['VESSEL_NOT_IN_SERVICE'])
  })

  it('permittedMaximum takes the lowest, ties in the listed order', () => {
    expect(permittedMaximum({ TIER: 6, VESSEL_RATING: 6, EVENT_CAP: 5, EQUIPMENT_RATING: 5 })).toEqual({ permittedMaxBar: 5, limitingFactor: 'EVENT_CAP' })
  })
})

describe('pressure at full precision', () => {
  const psiBar = (psi: number) => pressureToPa(psi, 'psi') / PA_PER_BAR
  it('a request exactly at the cap entered in kPa or MPa is allowed; one psi above is not', () => {
    expect(codes(facts({ requestedBar: pressureToPa(1000, 'kPa') / PA_PER_BAR }))).toEqual([])
    expect(codes(facts({ requestedBar: pressureToPa(1, 'MPa') / PA_PER_BAR }))).toEqual([])
    const capPsi = 10 * PA_PER_BAR / PA_PER_PSI
    // NIST SP 811 (2008) App. B.8: 1 psi = 6.894 757 kPa, so 10 bar = 145.0377 psi.
    expect(capPsi).toBeCloseTo(145.0377, 4)
    expect(codes(facts({ requestedBar: psiBar(capPsi) }))).toEqual([])
    // 145 psi (the cap rounded down in psi) is allowed; 146 psi (10.07 bar) is not.
    expect(codes(facts({ requestedBar: psiBar(145) }))).toEqual([])
    expect(codes(facts({ requestedBar: psiBar(Math.floor(capPsi) + 1) }))).toEqual(['TIER_CAP_EXCEEDED'])
  })
  it('never rounds a real excess away: 10.000001 bar is above 10', () => {
    expect(exceedsBar(10.000001, 10)).toBe(true)
    expect(exceedsBar(10 + 1e-12, 10)).toBe(false)
  })
})

describe('supervised fills', () => {
  const instructor = { isMember: false, onEventStaff: true, instructor: true, validRank: 3 } as const
  it('reach one tier above the member\'s own, and T1 from no tier or T0', () => {
    expect(reachableRank({ member: facts().member, juniorCapRank: 1, supervised: true })).toBe(3)
    expect(reachableRank({ member: { ...facts().member, validRank: null }, juniorCapRank: 1, supervised: true })).toBe(1)
    expect(reachableRank({ member: { ...facts().member, validRank: 0 }, juniorCapRank: 1, supervised: true })).toBe(1)
    expect(reachableRank({ member: { ...facts().member, validRank: 4 }, juniorCapRank: 1, supervised: true })).toBe(4)
  })

  it('a T2 member supervised at 15 bar (needs T3) by a T3 instructor is allowed; above T3\'s cap it is not', () => {
    expect(codes(facts({ requestedBar: 15, supervised: true, caller: instructor, vessel: { ratedFillBar: 20 } }))).toEqual([])
    expect(codes(facts({ requestedBar: 18, supervised: true, caller: instructor, vessel: { ratedFillBar: 20 } }))).toEqual(['TIER_CAP_EXCEEDED'])
  })

  it('a member without a tier may be supervised up to T1; NO_VALID_TIER does not apply', () => {
    expect(codes(facts({ requestedBar: 6, supervised: true, member: { validRank: null }, caller: instructor }))).toEqual([])
    expect(codes(facts({ requestedBar: 6.5, supervised: true, member: { validRank: null }, caller: instructor }))).toEqual(['TIER_CAP_EXCEEDED'])
  })

  it('an under-qualified supervisor is refused: the supervisor must hold the tier the fill needs', () => {
    expect(codes(facts({ requestedBar: 15, supervised: true, caller: { ...instructor, validRank: 2 }, vessel: { ratedFillBar: 20 } }))).toEqual(['SUPERVISOR_NOT_QUALIFIED'])
    expect(codes(facts({ requestedBar: 15, supervised: true, caller: { ...instructor, instructor: false }, vessel: { ratedFillBar: 20 } }))).toEqual(['SUPERVISOR_NOT_QUALIFIED'])
    expect(codes(facts({ requestedBar: 15, supervised: true, caller: { ...instructor, validRank: null }, vessel: { ratedFillBar: 20 } }))).toEqual(['SUPERVISOR_NOT_QUALIFIED'])
  })

  it('a supervised fill of one\'s own is refused, whatever one\'s role and tier', () => {
    expect(codes(facts({ supervised: true, caller: { isMember: true, onEventStaff: true, instructor: true, validRank: 4 } }))).toEqual(['SUPERVISOR_NOT_QUALIFIED'])
  })

  it('a junior never goes above the junior cap, supervised or not', () => {
    const junior = { junior: true, guardianConsent: true, validRank: 2 } as const
    expect(codes(facts({ requestedBar: 6, supervised: true, member: junior, caller: instructor }))).toEqual([])
    expect(decideFill(facts({ requestedBar: 7, supervised: true, member: junior, caller: instructor }))).toMatchObject({ permittedMaxBar: 6, limitingFactor: 'TIER' })
    expect(codes(facts({ requestedBar: 7, supervised: true, member: junior, caller: instructor }))).toEqual(['TIER_CAP_EXCEEDED'])
  })

  it('the tier a fill needs is the lowest from T1 whose cap covers it', () => {
    expect(tierNeededFor(0.5, TIERS)).toBe(1)
    expect(tierNeededFor(6, TIERS)).toBe(1)
    expect(tierNeededFor(6.01, TIERS)).toBe(2)
    expect(tierNeededFor(26, TIERS)).toBeNull()
  })
})
