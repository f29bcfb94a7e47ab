/**
 * The fill gate fed from a signed snapshot (the launch-side page without a network), pure. The
 * snapshot's facts are already those of the event's day; this turns them into the gate's facts for
 * one fill and leaves the decision to THE gate (`decideFill`), so the page offline can never allow
 * what the server, given the same facts, would refuse.
 *
 * - The caller is the staff member who downloaded the snapshot (its `issuedByMembershipId`) unless
 *   another id is given; someone not in the snapshot's staff list is not on the event's staff.
 * - A vessel with a fill-count limit may take only the fills reserved for this device: once the
 *   device has used them the vessel stands as due for retest (PROOF_LAPSED), as the server would see
 *   it with those fills counted.
 * - A fill offline is always a recording (the event must be today, by the device's clock in the
 *   club's time zone).
 */
import type { FillSnapshot, SnapshotMember, SnapshotVessel } from '../types/fill-snapshots'
import { dateInZone } from './dates'
import { decideFill, type FillDecision, type FillGateFacts } from './fill-gate'
import type { TierRank } from './tier-rules'
import type { PressureEntryUnit } from './units'
import { airCharge, VesselArithmeticError, type AirCharge } from './vessel-arithmetic'

/** One fill asked of the snapshot. */
export interface SnapshotFillQuery {
  memberId: string
  vesselId: string
  stationId: string
  requestedBar: number
  supervised: boolean
  /** The device's date (YYYY-MM-DD) in the club's time zone. */
  today: string
  /** Fills of this vessel this device has already recorded as allowed. */
  usedFills: number
  /** The caller; the snapshot's downloader when absent. */
  callerId?: string
  /** Whether the caller may supervise (an instructor); from the snapshot's staff list when absent. */
  callerInstructor?: boolean
}

/** What the snapshot lacks for a fill: the page says so instead of deciding. */
export type SnapshotMissing = 'member' | 'vessel' | 'station'

/** The member `id` in the snapshot, or undefined. */
export function snapshotMember(s: FillSnapshot, id: string): SnapshotMember | undefined {
  return s.members.find(m => m.id === id)
}

/** The vessel `id` of member `memberId` in the snapshot, or undefined. */
export function snapshotVessel(s: FillSnapshot, memberId: string, vesselId: string): SnapshotVessel | undefined {
  return snapshotMember(s, memberId)?.vessels.find(v => v.id === vesselId)
}

/** The state the gate sees: `retest_due` once the device has used every fill reserved for it. */
export function vesselStateOnDevice(v: SnapshotVessel, usedFills: number): SnapshotVessel['state'] {
  return v.state === 'in_service' && v.reservedFills !== null && usedFills >= v.reservedFills ? 'retest_due' : v.state
}

/** The gate's facts for one fill from the snapshot, or what the snapshot lacks. */
export function snapshotFacts(s: FillSnapshot, q: SnapshotFillQuery): { facts: FillGateFacts } | { missing: SnapshotMissing } {
  const member = snapshotMember(s, q.memberId)
  if (!member) return { missing: 'member' }
  const vessel = member.vessels.find(v => v.id === q.vesselId)
  if (!vessel) return { missing: 'vessel' }
  const station = s.stations.find(st => st.id === q.stationId)
  if (!station) return { missing: 'station' }
  const callerId = q.callerId ?? s.issuedByMembershipId
  const staff = s.staff.find(st => st.membershipId === callerId)
  const callerRank: TierRank | null = staff?.validRank ?? snapshotMember(s, callerId)?.validRank ?? null
  const courses: Record<string, { name: string, current: boolean }> = {}
  for (const c of s.courses) courses[c.code] = { name: c.name, current: member.courses[c.code] === true }
  return {
    facts: {
      requestedBar: q.requestedBar,
      today: q.today,
      recording: true,
      supervised: q.supervised,
      member: {
        status: member.status,
        waiverAccepted: member.waiverAccepted,
        junior: member.junior,
        guardianConsent: member.guardianConsent,
        validRank: member.validRank,
      },
      tiers: s.tiers.map(t => ({ rank: t.rank, fillCapBar: t.fillCapBar, requiredCourseCodes: t.requiredCourseCodes })),
      juniorCapRank: s.juniorCapRank,
      courses,
      vessel: {
        state: vesselStateOnDevice(vessel, q.usedFills),
        ratedFillBar: vessel.ratedFillBar,
        metalInPressurePath: vessel.metalInPressurePath,
      },
      event: { heldOn: s.event.heldOn, pressureCapBar: s.event.pressureCapBar, competition: s.event.competition },
      station: { atEvent: station.atEvent, launchLimitBar: station.launchLimitBar, gaugeCurrentThrough: station.gaugeCurrentThrough },
      caller: {
        isMember: callerId === q.memberId,
        onEventStaff: !!staff,
        instructor: q.callerInstructor ?? staff?.instructor ?? false,
        validRank: callerRank,
      },
    },
  }
}

/** THE gate's decision on one fill from the snapshot, or what the snapshot lacks. */
export function decideFromSnapshot(s: FillSnapshot, q: SnapshotFillQuery): { decision: FillDecision } | { missing: SnapshotMissing } {
  const r = snapshotFacts(s, q)
  return 'missing' in r ? r : { decision: decideFill(r.facts) }
}

/** The standoff figures beside a verdict, as the online check sends them. */
export type StandoffFigures = Pick<AirCharge, 'storedEnergyJ' | 'tntEquivalentKg' | 'minimumDistanceM'>

/**
 * The air charge of a fill the device decides, by the shared arithmetic and the snapshot's distance
 * rule, as the online check works it out (`airCharge`, ASME PCC-2 App. II and III). `problem`: the
 * arithmetic refuses the entry (the water fills the vessel), with its words, as the online check's 400
 * does. `charge` is null when the snapshot carries no distance rule (issued before it did).
 */
export function snapshotAirCharge(s: FillSnapshot, vessel: SnapshotVessel, entry: { pressure: number, unit: PressureEntryUnit, waterVolumeL: number }):
  { charge: StandoffFigures | null } | { problem: string } {
  try {
    // Without the club's rule the entry is still checked (with either rule: they differ only in the distance).
    const c = airCharge({ gaugePressure: entry.pressure, unit: entry.unit, vesselVolumeL: vessel.volumeL, waterVolumeL: entry.waterVolumeL, distanceRule: s.distanceRule ?? 'tnt' })
    return { charge: s.distanceRule ? { storedEnergyJ: c.storedEnergyJ, tntEquivalentKg: c.tntEquivalentKg, minimumDistanceM: c.minimumDistanceM } : null }
  }
  catch (error) {
    if (error instanceof VesselArithmeticError) return { problem: error.message }
    throw error
  }
}

/** The device's date in the club's time zone, and whether it is the event's day (the page decides only then). */
export function snapshotDay(s: FillSnapshot, deviceNow: Date): { today: string, eventDay: boolean } {
  const today = dateInZone(deviceNow, s.timeZone)
  return { today, eventDay: today === s.event.heldOn }
}

/**
 * The fill-pass id a scanned pass token carries (its first 16 bytes, base64url), or null when it is not
 * a token. Offline the token's own tag cannot be checked (its key stays on the server): the page
 * accepts it only when the id is the member's live pass in the snapshot, which nobody can guess.
 */
export function passIdFromToken(token: string): string | null {
  if (!/^[A-Za-z0-9_-]{43}$/.test(token)) return null
  const b64 = token.replace(/-/g, '+').replace(/_/g, '/') + '='
  let bytes: string
  try {
    bytes = atob(b64)
  }
  catch {
    return null
  }
  const hex = Array.from(bytes.slice(0, 16), ch => ch.charCodeAt(0).toString(16).padStart(2, '0')).join('')
  return `${hex.slice(0, 8)}-${hex.slice(8, 12)}-${hex.slice(12, 16)}-${hex.slice(16, 20)}-${hex.slice(20, 32)}`
}

/** The member whose live fill pass the scanned token is, or null (no such pass in the snapshot: refused). */
export function memberByPassToken(s: FillSnapshot, token: string): SnapshotMember | null {
  const id = passIdFromToken(token)
  return id ? s.members.find(m => m.fillPassId === id) ?? null : null
}
