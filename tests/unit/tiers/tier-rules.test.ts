import { describe, it, expect } from 'vitest'
import {
  assessorProblem, highestValidRank, renewalGaps, STARTING_TIER_LEVELS, tierGaps, tierState, tierTableProblem, usableRank,
  type GrantFacts, type HeldTier, type TierRank,
} from '../../../shared/utils/tier-rules'
import { TierTableSchema } from '../../../shared/schemas/tiers'

const TODAY = '2026-06-15'
const held = (rank: TierRank, o: Partial<HeldTier> = {}): HeldTier => ({ rank, firstGrantedOn: '2025-01-01', signedOn: '2025-06-01', expiresOn: '2027-01-01', suspended: false, revoked: false, ...o })
const level = (rank: number) => STARTING_TIER_LEVELS[rank]!

/** Facts that meet every prerequisite of `rank` for an adult: each test takes one away. */
function fullFacts(rank: number, o: Partial<GrantFacts> = {}): GrantFacts {
  const l = level(rank)
  return {
    level: l, today: TODAY, birthDate: '1980-01-01', juniorCapRank: 1, coursesNotCurrent: [],
    heldBelow: rank > 0 ? held((rank - 1) as TierRank, { firstGrantedOn: '2020-01-01' }) : null,
    loggedFills: l.minLoggedFills, supervisedFills: l.minSupervisedFills, ownVesselProofPassed: true, ...o,
  }
}
const codes = (f: GrantFacts) => tierGaps(f).map(g => g.code)

describe('tier state and the fall-back', () => {
  it.each([
    [{}, 'valid'], [{ expiresOn: '2026-06-15' }, 'valid'], [{ expiresOn: '2026-06-14' }, 'expired'],
    [{ suspended: true }, 'suspended'], [{ revoked: true, suspended: true }, 'revoked'],
  ] as const)('%o is %s', (o, state) => {
    expect(tierState(held(2, o), TODAY)).toBe(state)
  })

  it.each([
    ['the highest valid', [held(1), held(2), held(3)], 3],
    ['T3 suspended falls back to T2', [held(1), held(2), held(3, { suspended: true })], 2],
    ['T3 expired and T2 revoked fall back to T1', [held(1), held(2, { revoked: true }), held(3, { expiresOn: '2026-01-01' })], 1],
    ['nothing valid', [held(0, { expiresOn: '2026-01-01' })], null],
    ['nothing held', [], null],
  ] as const)('%s', (_label, tiers, rank) => {
    expect(highestValidRank(tiers, TODAY)).toBe(rank)
  })

  it.each([[3, false, 1, 3], [3, true, 1, 1], [0, true, 1, 0], [null, true, 1, null]] as const)('usable rank of %s (junior %s, cap T%s) is %s', (valid, junior, cap, want) => {
    expect(usableRank(valid, junior, cap)).toBe(want)
  })
})

describe('who may sign off', () => {
  const a = (roles: ('member' | 'instructor' | 'safety_officer')[], validRank: TierRank | null, membershipId = 'assessor') => ({ membershipId, roles, validRank })
  it.each([
    ['T0 by an instructor with T1', a(['instructor'], 1), 0, null],
    ['T0 by an instructor without a tier', a(['instructor'], null), 0, /T1 or higher/],
    ['T0 by a member with T3', a(['member'], 3), 0, /instructor/],
    ['T2 by an instructor with T3', a(['instructor'], 3), 2, null],
    ['T2 by an instructor with only T2', a(['instructor'], 2), 2, /above it/],
    ['T3 by a safety officer with T4', a(['safety_officer'], 4), 3, null],
    ['T4 by a safety officer with T4', a(['safety_officer'], 4), 4, null],
    ['T4 by an instructor with T4', a(['instructor'], 4), 4, /safety officer/],
    ['T4 by a safety officer with T3', a(['safety_officer'], 3), 4, /valid T4/],
    ['oneself', a(['safety_officer'], 4, 'member'), 1, /own tier/],
  ] as const)('%s', (_label, assessor, rank, want) => {
    const problem = assessorProblem(assessor, 'member', rank as TierRank)
    if (want === null) expect(problem).toBeNull()
    else expect(problem).toMatch(want)
  })
})

describe('tier eligibility (every missing prerequisite)', () => {
  it.each([0, 1, 2, 3, 4])('T%s with every prerequisite met has no gap', (rank) => {
    expect(tierGaps(fullFacts(rank))).toEqual([])
  })

  it('lists every gap at once, not the first', () => {
    const f = fullFacts(3, { coursesNotCurrent: ['Composite handling and PPE'], heldBelow: null, loggedFills: 2, supervisedFills: 1, ownVesselProofPassed: false, birthDate: '2010-01-01' })
    expect(codes(f)).toEqual(['COURSE_NOT_CURRENT', 'TIER_BELOW_NOT_HELD', 'LOGGED_FILLS_SHORT', 'SUPERVISED_FILLS_SHORT', 'UNDER_MIN_AGE', 'ABOVE_JUNIOR_CAP', 'OWN_VESSEL_PROOF_MISSING'])
  })

  it('the tier below must have been held long enough', () => {
    expect(codes(fullFacts(2, { heldBelow: held(1, { firstGrantedOn: '2026-05-01' }) }))).toEqual(['TIER_BELOW_NOT_HELD'])
    expect(codes(fullFacts(2, { heldBelow: held(1, { firstGrantedOn: '2026-03-15' }) }))).toEqual([])
    expect(codes(fullFacts(2, { heldBelow: held(1, { firstGrantedOn: '2020-01-01', suspended: true }) }))).toEqual(['TIER_BELOW_NOT_HELD'])
  })

  it('a junior holds at most the junior cap', () => {
    expect(codes(fullFacts(1, { birthDate: '2012-01-01' }))).toEqual([])
    expect(codes(fullFacts(2, { birthDate: '2012-01-01' }))).toEqual(['ABOVE_JUNIOR_CAP'])
    expect(codes(fullFacts(2, { birthDate: '2012-01-01', juniorCapRank: 2 }))).toEqual([])
  })

  it('no birth date counts as a junior: T0 and T1 may be granted, above the cap it is refused and the date asked for', () => {
    expect(codes(fullFacts(0, { birthDate: null }))).toEqual([])
    expect(codes(fullFacts(1, { birthDate: null }))).toEqual([])
    expect(codes(fullFacts(2, { birthDate: null }))).toEqual(['BIRTH_DATE_MISSING', 'ABOVE_JUNIOR_CAP'])
  })

  it('renewal needs the minimum fills within the validity and no open incident', () => {
    expect(renewalGaps({ level: level(2), fillsWithinValidity: 4, openIncidents: 0 })).toEqual([])
    expect(renewalGaps({ level: level(2), fillsWithinValidity: 3, openIncidents: 1 }).map(g => g.code)).toEqual(['LOGGED_FILLS_SHORT', 'OPEN_INCIDENT'])
  })
})

describe('the tier table', () => {
  const table = () => STARTING_TIER_LEVELS.map(l => ({ ...l }))
  it('accepts the starting table and refuses caps that do not rise or a T0 cap', () => {
    expect(tierTableProblem(table())).toBeNull()
    expect(tierTableProblem(table().map(l => (l.rank === 2 ? { ...l, fillCapBar: 6 } : l)))).toMatch(/T2 \(6 bar\) is not above T1/)
    expect(tierTableProblem(table().map(l => (l.rank === 0 ? { ...l, fillCapBar: 1 } : l)))).toMatch(/T0/)
  })
  it('its schema refuses a missing tier, a duplicate name and falling caps with the sentence the page shows', () => {
    expect(TierTableSchema.safeParse({ levels: table(), juniorCapRank: 1 }).success).toBe(true)
    expect(TierTableSchema.safeParse({ levels: table().slice(1), juniorCapRank: 1 }).success).toBe(false)
    const named = TierTableSchema.safeParse({ levels: table().map(l => ({ ...l, name: 'Same' })), juniorCapRank: 1 })
    expect(named.error?.issues.map(i => i.message)).toContain('Each tier needs a name of its own')
    const falling = TierTableSchema.safeParse({ levels: table().map(l => (l.rank === 4 ? { ...l, fillCapBar: 12 } : l)), juniorCapRank: 1 })
    expect(falling.error?.issues[0]?.message).toMatch(/Fill caps must rise/)
  })
})
