import { describe, it, expect } from 'vitest'
import { FILL_SNAPSHOT_VERSION, type FillSnapshot } from '../../../shared/types/fill-snapshots'
import { decideFromSnapshot, memberByPassToken, passIdFromToken, snapshotAirCharge, snapshotDay, snapshotFacts, vesselStateOnDevice } from '../../../shared/utils/fill-snapshot'
import { airCharge } from '../../../shared/utils/vessel-arithmetic'
import { STARTING_TIER_LEVELS } from '../../../shared/utils/tier-rules'
import { fillPassToken } from '../../../server/services/tiers/fill-pass-token'

const HELD_ON = '2026-07-04'
const MEMBER = '11111111-1111-4111-8111-111111111111'
const STAFF = '22222222-2222-4222-8222-222222222222'
const VESSEL = '33333333-3333-4333-8333-333333333333'
const STATION = '44444444-4444-4444-8444-444444444444'
const PASS = '55555555-5555-4555-8555-555555555555'

/** An invented event: one adult T2 member with one vessel (rated 12 bar, 2 fills reserved), one staff instructor. */
function snapshot(): FillSnapshot {
  return {
    version: FILL_SNAPSHOT_VERSION,
    clubId: '66666666-6666-4666-8666-666666666666',
    clubName: 'Test club',
    timeZone: 'Europe/Berlin',
    deviceId: '77777777-7777-4777-8777-777777777777',
    issuedAt: '2026-07-03T18:00:00.000Z',
    issuedByMembershipId: STAFF,
    event: { id: '88888888-8888-4888-8888-888888888888', site: 'North field', heldOn: HELD_ON, pressureCapBar: 20, competition: false },
    tiers: STARTING_TIER_LEVELS.map(t => ({ rank: t.rank, code: `T${t.rank}`, name: `Tier ${t.rank}`, fillCapBar: t.fillCapBar, requiredCourseCodes: [...t.requiredCourseCodes] })),
    juniorCapRank: 1,
    courses: ['pressure_safety', 'rig_operator', 'composite_ppe', 'range_safety'].map(code => ({ code, name: code })),
    members: [{
      id: MEMBER, name: 'Member', status: 'active', waiverAccepted: true, junior: false, guardianConsent: false,
      tiers: [{ rank: 2, expiresOn: '2027-01-01' }], validRank: 2,
      courses: { pressure_safety: true, rig_operator: true, composite_ppe: true, range_safety: true },
      fillPassId: PASS,
      vessels: [{ id: VESSEL, tag: 'HW-0001', ownerMembershipId: MEMBER, state: 'in_service', ratedFillBar: 12, metalInPressurePath: false, volumeL: 2, reservedFills: 2 }],
    }],
    staff: [{ membershipId: STAFF, name: 'Staff', instructor: true, validRank: 3 }],
    stations: [{ id: STATION, name: 'Pad A', atEvent: true, launchLimitBar: 25, gaugeCurrentThrough: '2026-12-31' }],
  }
}

const ask = { memberId: MEMBER, vesselId: VESSEL, stationId: STATION, requestedBar: 8, supervised: false, today: HELD_ON, usedFills: 0 }
const codesOf = (r: ReturnType<typeof decideFromSnapshot>) => ('decision' in r ? r.decision.reasons.map(x => x.code) : [r.missing])

describe('the fill gate fed from a snapshot', () => {
  it('allows a fill within every limit, recorded by the staff member who downloaded it', () => {
    const r = decideFromSnapshot(snapshot(), ask)
    expect(codesOf(r)).toEqual([])
    // The lowest limit is the T2 cap (10 bar, the starting tier table), below the vessel's 12.
    expect('decision' in r && r.decision.permittedMaxBar).toBe(10)
    const f = snapshotFacts(snapshot(), ask)
    expect('facts' in f && f.facts.caller).toEqual({ isMember: false, onEventStaff: true, instructor: true, validRank: 3 })
    expect('facts' in f && f.facts.recording).toBe(true)
  })

  it('stands the vessel as due for retest once the device used its reserved fills', () => {
    expect(codesOf(decideFromSnapshot(snapshot(), { ...ask, usedFills: 1 }))).toEqual([])
    expect(codesOf(decideFromSnapshot(snapshot(), { ...ask, usedFills: 2 }))).toEqual(['PROOF_LAPSED'])
    const unlimited = { ...snapshot().members[0]!.vessels[0]!, reservedFills: null }
    expect(vesselStateOnDevice(unlimited, 500)).toBe('in_service')
  })

  it('refuses past the tier cap, for an unlisted caller, and on another day, as the gate does', () => {
    expect(codesOf(decideFromSnapshot(snapshot(), { ...ask, requestedBar: 11 }))).toEqual(['TIER_CAP_EXCEEDED'])
    expect(codesOf(decideFromSnapshot(snapshot(), { ...ask, callerId: '99999999-9999-4999-8999-999999999999' }))).toEqual(['NOT_ON_EVENT_STAFF'])
    expect(codesOf(decideFromSnapshot(snapshot(), { ...ask, today: '2026-07-05' }))).toEqual(['EVENT_NOT_TODAY'])
  })

  it('names what the snapshot lacks instead of deciding', () => {
    expect(codesOf(decideFromSnapshot(snapshot(), { ...ask, memberId: STAFF }))).toEqual(['member'])
    expect(codesOf(decideFromSnapshot(snapshot(), { ...ask, vesselId: STATION }))).toEqual(['vessel'])
    expect(codesOf(decideFromSnapshot(snapshot(), { ...ask, stationId: VESSEL }))).toEqual(['station'])
  })

  it('takes the device day in the club time zone', () => {
    // 23:30 UTC on 3 July is 01:30 on 4 July in Berlin (UTC+2 in summer).
    expect(snapshotDay(snapshot(), new Date('2026-07-03T23:30:00Z'))).toEqual({ today: HELD_ON, eventDay: true })
    expect(snapshotDay(snapshot(), new Date('2026-07-03T21:30:00Z'))).toEqual({ today: '2026-07-03', eventDay: false })
  })

  it('reads the pass id from a fill-pass token and finds only the live pass', () => {
    const token = fillPassToken('k'.repeat(64), PASS)
    expect(passIdFromToken(token)).toBe(PASS)
    expect(memberByPassToken(snapshot(), token)?.id).toBe(MEMBER)
    expect(memberByPassToken(snapshot(), fillPassToken('k'.repeat(64), MEMBER))).toBeNull()
    expect(passIdFromToken('not a token')).toBeNull()
  })

  it('works out the standoff with the snapshot\'s distance rule, as the online check does, and refuses water filling the vessel', () => {
    const s = { ...snapshot(), distanceRule: '2tnt' as const }
    const vessel = s.members[0]!.vessels[0]!
    const entry = { pressure: 8, unit: 'bar' as const, waterVolumeL: 0.6 }
    const online = airCharge({ gaugePressure: 8, unit: 'bar', vesselVolumeL: vessel.volumeL, waterVolumeL: 0.6, distanceRule: '2tnt' })
    expect(snapshotAirCharge(s, vessel, entry)).toEqual({
      charge: { storedEnergyJ: online.storedEnergyJ, tntEquivalentKg: online.tntEquivalentKg, minimumDistanceM: online.minimumDistanceM },
    })
    // ASME PCC-2 (2008) Mandatory App. III (a): at least 30 m while the stored energy is at most 135.5 MJ.
    expect(online.minimumDistanceM).toBe(30)
    // A snapshot issued before it carried the rule: the entry is still checked, no standoff is shown.
    expect(snapshotAirCharge(snapshot(), vessel, entry)).toEqual({ charge: null })
    const full = snapshotAirCharge(s, vessel, { ...entry, waterVolumeL: 2 })
    expect(full).toHaveProperty('problem')
    expect('problem' in full && full.problem).toMatch(/water/i)
  })
})
