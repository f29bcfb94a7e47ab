/**
 * THE fill gate, pure: given every fact about one requested fill, the permitted maximum, what set
 * it, and every rule that fails. The server gathers the facts (services/fills) and answers with this;
 * nothing else decides a fill.
 *
 * - The permitted maximum is the lowest of the tier cap, the vessel's rated fill, the event cap and
 *   the station's launch pressure (its lowest rated part ÷ the club's equipment factor); ties go to
 *   the earlier of TIER, VESSEL_RATING, EVENT_CAP, EQUIPMENT_RATING. With no valid tier the tier cap
 *   is 0; a vessel not in service has a rated fill of 0. It is this lowest limit whatever else fails.
 * - The tier cap is that of the member's highest valid tier (a junior's held to the junior cap). A
 *   supervised fill may reach one tier above it (T1 for a member with no tier or only T0; never past
 *   the junior cap), and its supervisor must hold a valid tier at or above the tier the fill needs —
 *   the lowest tier whose cap covers the request.
 * - A pressure is compared at full precision (in bar, converted from what was entered) before any
 *   rounding; a difference under a nanobar is float noise from the conversion, not an excess.
 * - NO_VALID_TIER replaces TIER_CAP_EXCEEDED when no tier is valid (and the fill is not supervised);
 *   PROOF_LAPSED replaces VESSEL_NOT_IN_SERVICE for a vessel due for retest; either of them replaces
 *   RATED_FILL_EXCEEDED (a vessel that may not be filled has no rated fill to exceed).
 */
import { fillReason, type FillReason, type LimitingFactor } from './fill-reasons'
import type { MembershipStatus } from './membership-status'
import { TOP_TIER_RANK, type TierRank } from './tier-rules'

/** The course every fill needs current, whatever the tier. */
export const FILL_COURSE_CODE = 'pressure_safety'

/** Float noise allowed when comparing a converted pressure with a limit, in bar. */
export const PRESSURE_COMPARE_TOLERANCE_BAR = 1e-9

/** Whether `requestedBar` is above `limitBar` (see the tolerance above). */
export function exceedsBar(requestedBar: number, limitBar: number): boolean {
  return requestedBar - limitBar > PRESSURE_COMPARE_TOLERANCE_BAR
}

/** Everything the gate decides on. Dates are YYYY-MM-DD in the club's calendar. */
export interface FillGateFacts {
  requestedBar: number
  today: string
  /** Recording (the event must be today) or a check (today or later). */
  recording: boolean
  supervised: boolean
  member: {
    status: MembershipStatus
    waiverAccepted: boolean
    /** Under 18, or no birth date on record. */
    junior: boolean
    guardianConsent: boolean
    /** Highest valid tier rank today, or null. */
    validRank: TierRank | null
  }
  /** The club's tier table, every rank, with the courses each needs. */
  tiers: readonly { rank: TierRank, fillCapBar: number, requiredCourseCodes: readonly string[] }[]
  juniorCapRank: number
  /** The member's courses by code: name and whether current today. */
  courses: Readonly<Record<string, { name: string, current: boolean }>>
  vessel: {
    /** The vessel's effective state: `retest_due` when in service with its proof lapsed. */
    state: 'awaiting_proof' | 'in_service' | 'retest_due' | 'quarantined' | 'failed' | 'retired'
    ratedFillBar: number | null
    metalInPressurePath: boolean
  }
  event: { heldOn: string, pressureCapBar: number, competition: boolean }
  station: {
    atEvent: boolean
    /** Lowest rated part ÷ the equipment factor, in bar. */
    launchLimitBar: number
    /** The last day the gauge's calibration is current. */
    gaugeCurrentThrough: string
  }
  caller: {
    /** The caller is the member being filled. */
    isMember: boolean
    onEventStaff: boolean
    instructor: boolean
    validRank: TierRank | null
  }
}

/** The gate's answer (the fill check adds the request and the air charge). */
export interface FillDecision {
  allowed: boolean
  permittedMaxBar: number
  limitingFactor: LimitingFactor
  reasons: FillReason[]
  /** The lowest tier whose cap covers the request (null: above every cap). */
  neededRank: TierRank | null
}

/** The lowest rank from T1 whose cap covers `requestedBar`, or null when no tier's does. */
export function tierNeededFor(requestedBar: number, tiers: FillGateFacts['tiers']): TierRank | null {
  const sorted = [...tiers].filter(t => t.rank > 0).sort((a, b) => a.rank - b.rank)
  return sorted.find(t => !exceedsBar(requestedBar, t.fillCapBar))?.rank ?? null
}

/**
 * The highest rank a fill may rely on: the member's usable rank, or for a supervised fill one above it
 * (T1 from no tier or T0), never past the top tier nor, for a junior, the junior cap.
 */
export function reachableRank(f: Pick<FillGateFacts, 'member' | 'juniorCapRank' | 'supervised'>): TierRank | null {
  const own = f.member.validRank === null ? null : (f.member.junior ? Math.min(f.member.validRank, f.juniorCapRank) : f.member.validRank)
  if (!f.supervised) return own as TierRank | null
  const reach = Math.min((own ?? 0) + 1, TOP_TIER_RANK)
  return (f.member.junior ? Math.min(reach, f.juniorCapRank) : reach) as TierRank
}

/** The lowest of the four limits and the one that set it (ties in LIMITING_FACTORS order). */
export function permittedMaximum(limits: Record<LimitingFactor, number>): { permittedMaxBar: number, limitingFactor: LimitingFactor } {
  let best: { permittedMaxBar: number, limitingFactor: LimitingFactor } = { permittedMaxBar: limits.TIER, limitingFactor: 'TIER' }
  for (const factor of ['VESSEL_RATING', 'EVENT_CAP', 'EQUIPMENT_RATING'] as const) {
    if (limits[factor] < best.permittedMaxBar) best = { permittedMaxBar: limits[factor], limitingFactor: factor }
  }
  return best
}

/** The decision on one fill: the permitted maximum, its limiting factor and every failed rule, in code order. */
export function decideFill(f: FillGateFacts): FillDecision {
  const reasons: FillReason[] = []
  const add = (code: Parameters<typeof fillReason>[0], detail?: string) => reasons.push(fillReason(code, detail))
  const capOf = (rank: number) => f.tiers.find(t => t.rank === rank)?.fillCapBar ?? 0
  const requested = f.requestedBar

  if (f.member.status !== 'active') add('MEMBERSHIP_NOT_ACTIVE')
  if (!f.member.waiverAccepted) add('WAIVER_NOT_ACCEPTED')
  if (f.member.junior && !f.member.guardianConsent) add('GUARDIAN_CONSENT_MISSING')

  const reach = reachableRank(f)
  const needed = tierNeededFor(requested, f.tiers)
  const tierCapBar = reach === null ? 0 : capOf(reach)
  if (reach === null) add('NO_VALID_TIER')
  else if (exceedsBar(requested, tierCapBar)) add('TIER_CAP_EXCEEDED')

  const reliedOn = Math.max(1, Math.min(needed ?? reach ?? 1, reach ?? 1))
  const courseCodes = [FILL_COURSE_CODE, ...(f.tiers.find(t => t.rank === reliedOn)?.requiredCourseCodes ?? [])]
  const lapsed = [...new Set(courseCodes)].filter(code => !f.courses[code]?.current).map(code => f.courses[code]?.name ?? code)
  if (lapsed.length) add('COURSE_NOT_CURRENT', lapsed.join(', '))

  const inService = f.vessel.state === 'in_service'
  const ratedBar = inService ? (f.vessel.ratedFillBar ?? 0) : 0
  if (f.vessel.state === 'retest_due') add('PROOF_LAPSED')
  else if (!inService) add('VESSEL_NOT_IN_SERVICE')
  else if (exceedsBar(requested, ratedBar)) add('RATED_FILL_EXCEEDED')

  if (exceedsBar(requested, f.event.pressureCapBar)) add('EVENT_CAP_EXCEEDED')
  if (exceedsBar(requested, f.station.launchLimitBar)) add('EQUIPMENT_RATING_EXCEEDED')
  if (f.today > f.station.gaugeCurrentThrough) add('GAUGE_CALIBRATION_DUE')
  if (f.event.competition && f.vessel.metalInPressurePath) add('METAL_IN_PRESSURE_PATH')
  if (f.member.junior && !f.supervised) add('JUNIOR_UNSUPERVISED')
  if (f.supervised) {
    const rankToCover = Math.min(needed ?? reach!, reach!)
    const qualified = !f.caller.isMember && f.caller.instructor && f.caller.validRank !== null && f.caller.validRank >= rankToCover
    if (!qualified) add('SUPERVISOR_NOT_QUALIFIED')
  }
  if (!f.caller.isMember && !f.caller.onEventStaff) add('NOT_ON_EVENT_STAFF')
  if (!f.station.atEvent) add('STATION_NOT_AT_EVENT')
  if (f.recording ? f.event.heldOn !== f.today : f.event.heldOn < f.today) add('EVENT_NOT_TODAY')

  const max = permittedMaximum({ TIER: tierCapBar, VESSEL_RATING: ratedBar, EVENT_CAP: f.event.pressureCapBar, EQUIPMENT_RATING: f.station.launchLimitBar })
  return { allowed: reasons.length === 0, ...max, reasons, neededRank: needed }
}
