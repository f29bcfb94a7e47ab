/**
 * Pressure tiers: THE rules on them, pure (the server, the screens and the fill gate use these).
 *
 * - A tier signed on D with a validity of N months is current through D + N calendar months
 *   inclusive (the training validity rule, `trainingExpiresOn`).
 * - A held tier is revoked, else suspended, else expired (after its expiry date), else valid. A
 *   member's tier is the highest valid one: expiry or suspension falls back, never to nothing when a
 *   lower tier is still valid. A course lapsing leaves the tier valid (the fill gate refuses instead).
 * - Juniors — and members with no birth date on record — hold at most the club's junior cap.
 * - Who may sign off: T0 any instructor holding a valid T1 or higher; T1–T3 an instructor or safety
 *   officer holding a valid tier above the one granted; T4 a safety officer holding a valid T4;
 *   never oneself.
 */
import { isJunior } from './membership-status'
import { trainingExpiresOn } from './training-validity'
import { addCalendarMonths } from './dates'
import type { Role } from './permissions'
import type { Words } from './words'

export const TIER_RANKS = [0, 1, 2, 3, 4] as const
export type TierRank = typeof TIER_RANKS[number]
export const TOP_TIER_RANK: TierRank = 4

/** The tier's short code, T0 … T4. */
export function tierCode(rank: number): string {
  return `T${rank}`
}

/** One row of the club's tier table. */
export interface TierLevel {
  rank: TierRank
  name: string
  fillCapBar: number
  validityMonths: number
  /** Course codes that must be current at the grant (and for a fill that relies on this tier). */
  requiredCourseCodes: string[]
  /** Months the tier below must have been held (0: the tier below is not needed). */
  heldBelowMonths: number
  minLoggedFills: number
  minSupervisedFills: number
  /** Only supervised fills above this pressure count (null: any). */
  supervisedFillsAboveBar: number | null
  minAgeYears: number | null
  ownVesselProofRequired: boolean
  /** Fills logged within the validity that a renewal needs. */
  renewalMinFills: number
}

/** The tier table every club starts with (the migration seeds the same rows); a starting policy, not a standard. */
export const STARTING_TIER_LEVELS: readonly TierLevel[] = [
  { rank: 0, name: 'Crew', fillCapBar: 0, validityMonths: 12, requiredCourseCodes: ['safety_briefing'], heldBelowMonths: 0, minLoggedFills: 0, minSupervisedFills: 0, supervisedFillsAboveBar: null, minAgeYears: null, ownVesselProofRequired: false, renewalMinFills: 0 },
  { rank: 1, name: 'Bottle', fillCapBar: 6, validityMonths: 24, requiredCourseCodes: ['pressure_safety'], heldBelowMonths: 0, minLoggedFills: 0, minSupervisedFills: 3, supervisedFillsAboveBar: null, minAgeYears: null, ownVesselProofRequired: false, renewalMinFills: 4 },
  { rank: 2, name: 'Reinforced', fillCapBar: 10, validityMonths: 24, requiredCourseCodes: ['rig_operator'], heldBelowMonths: 3, minLoggedFills: 10, minSupervisedFills: 5, supervisedFillsAboveBar: null, minAgeYears: null, ownVesselProofRequired: false, renewalMinFills: 4 },
  { rank: 3, name: 'Composite', fillCapBar: 17, validityMonths: 12, requiredCourseCodes: ['composite_ppe'], heldBelowMonths: 6, minLoggedFills: 15, minSupervisedFills: 5, supervisedFillsAboveBar: 10, minAgeYears: 18, ownVesselProofRequired: true, renewalMinFills: 6 },
  { rank: 4, name: 'Senior', fillCapBar: 25, validityMonths: 12, requiredCourseCodes: ['range_safety'], heldBelowMonths: 12, minLoggedFills: 20, minSupervisedFills: 0, supervisedFillsAboveBar: null, minAgeYears: 18, ownVesselProofRequired: false, renewalMinFills: 6 },
]

/** The junior cap every club starts with: T1. */
export const DEFAULT_JUNIOR_CAP_RANK: TierRank = 1

/** Why a table of tiers is refused: caps must rise strictly with rank, and T0's is 0. Null when fine. */
export function tierTableProblem(levels: readonly { rank: number, fillCapBar: number }[]): string | null {
  const sorted = [...levels].sort((a, b) => a.rank - b.rank)
  if (sorted[0]?.rank === 0 && sorted[0].fillCapBar !== 0) return 'T0 allows no fills: its fill cap is 0 bar.'
  for (let i = 1; i < sorted.length; i++) {
    if (sorted[i]!.fillCapBar <= sorted[i - 1]!.fillCapBar) {
      return `Fill caps must rise with each tier: ${tierCode(sorted[i]!.rank)} (${sorted[i]!.fillCapBar} bar) is not above ${tierCode(sorted[i - 1]!.rank)} (${sorted[i - 1]!.fillCapBar} bar).`
    }
  }
  return null
}

/** The expiry of a tier signed (granted or renewed) on `signedOn` with `validityMonths`: the training rule. */
export function tierExpiresOn(signedOn: string, validityMonths: number): string {
  return trainingExpiresOn(signedOn, validityMonths)
}

export const TIER_STATES = ['valid', 'expired', 'suspended', 'revoked'] as const
export type TierState = typeof TIER_STATES[number]

export const TIER_STATE_WORDS: Record<TierState, Words> = {
  valid: { label: 'Valid', meaning: 'Signed off and current through its expiry date.' },
  expired: { label: 'Expired', meaning: 'Past its expiry date: an instructor\'s re-sign-off renews it.' },
  suspended: { label: 'Suspended', meaning: 'Suspended by the safety officer until reinstated.' },
  revoked: { label: 'Revoked', meaning: 'Withdrawn by the safety officer: only a new grant restores it.' },
}

/** A tier a member holds (or held). Dates are YYYY-MM-DD in the club's calendar. */
export interface HeldTier {
  rank: TierRank
  firstGrantedOn: string
  signedOn: string
  expiresOn: string
  suspended: boolean
  revoked: boolean
}

/** The state of a held tier on `today`: revoked, else suspended, else expired after its expiry date, else valid. */
export function tierState(t: Pick<HeldTier, 'expiresOn' | 'suspended' | 'revoked'>, today: string): TierState {
  if (t.revoked) return 'revoked'
  if (t.suspended) return 'suspended'
  return today > t.expiresOn ? 'expired' : 'valid'
}

/** The highest rank among `tiers` valid on `today`, or null when none is: the fall-back rule. */
export function highestValidRank(tiers: readonly Pick<HeldTier, 'rank' | 'expiresOn' | 'suspended' | 'revoked'>[], today: string): TierRank | null {
  let best: TierRank | null = null
  for (const t of tiers) if (tierState(t, today) === 'valid' && (best === null || t.rank > best)) best = t.rank
  return best
}

/**
 * Whether the tier and fill rules treat someone born on `birthDate` as a junior on `today`: under 18,
 * or with no birth date on record (the safe side until the member gives it).
 */
export function juniorForTiers(birthDate: string | null | undefined, today: string): boolean {
  return !birthDate || isJunior(birthDate, today)
}

/** The rank a member may use: their highest valid one, held down to the junior cap for a junior. */
export function usableRank(validRank: TierRank | null, junior: boolean, juniorCapRank: number): TierRank | null {
  if (validRank === null) return null
  return (junior ? Math.min(validRank, juniorCapRank) : validRank) as TierRank
}

// ─── Who may sign off ─────────────────────────────────────────────────────────────────────────────

export interface Assessor {
  membershipId: string
  roles: readonly Role[]
  /** The assessor's highest valid rank today, or null. */
  validRank: TierRank | null
}

/** Why `assessor` may not sign off rank `rank` for member `memberId`, or null when they may. */
export function assessorProblem(assessor: Assessor, memberId: string, rank: TierRank): string | null {
  if (assessor.membershipId === memberId) return 'Nobody signs off their own tier.'
  const held = assessor.validRank
  if (rank === 0) {
    if (!assessor.roles.includes('instructor')) return 'T0 is signed off by an instructor.'
    if (held === null || held < 1) return 'Signing off T0 needs a valid T1 or higher of your own.'
    return null
  }
  if (rank === TOP_TIER_RANK) {
    if (!assessor.roles.includes('safety_officer')) return 'T4 is signed off by a safety officer.'
    if (held !== TOP_TIER_RANK) return 'Signing off T4 needs a valid T4 of your own.'
    return null
  }
  if (!assessor.roles.includes('instructor') && !assessor.roles.includes('safety_officer')) return `${tierCode(rank)} is signed off by an instructor or a safety officer.`
  if (held === null || held <= rank) return `Signing off ${tierCode(rank)} needs a valid tier above it of your own (${tierCode(rank + 1)} or higher).`
  return null
}

// ─── Prerequisites ────────────────────────────────────────────────────────────────────────────────

export const TIER_GAP_CODES = [
  'COURSE_NOT_CURRENT', 'TIER_BELOW_NOT_HELD', 'LOGGED_FILLS_SHORT', 'SUPERVISED_FILLS_SHORT',
  'BIRTH_DATE_MISSING', 'UNDER_MIN_AGE', 'OWN_VESSEL_PROOF_MISSING', 'ABOVE_JUNIOR_CAP', 'OPEN_INCIDENT',
] as const
export type TierGapCode = typeof TIER_GAP_CODES[number]
export interface TierGap { code: TierGapCode, message: string }

/** What a grant of `level` is decided on, gathered for one member on the club's `today`. */
export interface GrantFacts {
  level: TierLevel
  today: string
  birthDate: string | null
  juniorCapRank: number
  /** Names of the level's required courses that are not current today. */
  coursesNotCurrent: string[]
  /** The member's tier one rank below, if ever held. */
  heldBelow: Pick<HeldTier, 'firstGrantedOn' | 'expiresOn' | 'suspended' | 'revoked'> | null
  loggedFills: number
  /** Supervised fills counted as the level asks (above its pressure, when it names one). */
  supervisedFills: number
  ownVesselProofPassed: boolean
}

/** Every prerequisite of the grant that `f` does not meet (empty: the grant may go ahead). */
export function tierGaps(f: GrantFacts): TierGap[] {
  const { level } = f
  const code = tierCode(level.rank)
  const gaps: TierGap[] = []
  if (f.coursesNotCurrent.length) gaps.push({ code: 'COURSE_NOT_CURRENT', message: `Courses not current: ${f.coursesNotCurrent.join(', ')}.` })
  if (level.rank > 0 && level.heldBelowMonths > 0) {
    const below = tierCode(level.rank - 1)
    const held = f.heldBelow && tierState(f.heldBelow, f.today) === 'valid' ? f.heldBelow : null
    if (!held) gaps.push({ code: 'TIER_BELOW_NOT_HELD', message: `${below} must be held and valid (for at least ${level.heldBelowMonths} months).` })
    else if (addCalendarMonths(held.firstGrantedOn, level.heldBelowMonths) > f.today) {
      gaps.push({ code: 'TIER_BELOW_NOT_HELD', message: `${below} has been held since ${held.firstGrantedOn}; ${code} needs it held ${level.heldBelowMonths} months (from ${addCalendarMonths(held.firstGrantedOn, level.heldBelowMonths)}).` })
    }
  }
  if (f.loggedFills < level.minLoggedFills) gaps.push({ code: 'LOGGED_FILLS_SHORT', message: `${level.minLoggedFills} logged fills needed, ${f.loggedFills} on record.` })
  if (f.supervisedFills < level.minSupervisedFills) {
    const above = level.supervisedFillsAboveBar === null ? '' : ` above ${level.supervisedFillsAboveBar} bar`
    gaps.push({ code: 'SUPERVISED_FILLS_SHORT', message: `${level.minSupervisedFills} supervised fills${above} needed, ${f.supervisedFills} on record.` })
  }
  const junior = juniorForTiers(f.birthDate, f.today)
  // Without a birth date the member counts as a junior: the gap is named only where the date decides
  // (a minimum age, or a tier above the junior cap), so T0 and the junior tiers can still be granted.
  if (!f.birthDate) {
    if (level.minAgeYears !== null || level.rank > f.juniorCapRank) gaps.push({ code: 'BIRTH_DATE_MISSING', message: 'No birth date on record: the member counts as a junior until it is given.' })
  }
  else if (level.minAgeYears !== null && ageBelow(f.birthDate, f.today, level.minAgeYears)) {
    gaps.push({ code: 'UNDER_MIN_AGE', message: `${code} needs the member to be at least ${level.minAgeYears}.` })
  }
  if (junior && level.rank > f.juniorCapRank) gaps.push({ code: 'ABOVE_JUNIOR_CAP', message: `Juniors hold at most ${tierCode(f.juniorCapRank)}.` })
  if (level.ownVesselProofRequired && !f.ownVesselProofPassed) gaps.push({ code: 'OWN_VESSEL_PROOF_MISSING', message: 'One of the member\'s own vessels must have passed a witnessed proof test.' })
  return gaps
}

/** Whether someone born on `birthDate` is younger than `years` on `today` (birthdays by calendar months). */
function ageBelow(birthDate: string, today: string, years: number): boolean {
  return addCalendarMonths(birthDate, years * 12) > today
}

/**
 * What a renewal of a held tier needs: the club's minimum fills logged within the current validity
 * and no open incident (none exist until incidents are recorded). Empty when it may go ahead.
 */
export function renewalGaps(f: { level: TierLevel, fillsWithinValidity: number, openIncidents: number }): TierGap[] {
  const gaps: TierGap[] = []
  if (f.fillsWithinValidity < f.level.renewalMinFills) {
    gaps.push({ code: 'LOGGED_FILLS_SHORT', message: `${f.level.renewalMinFills} fills within the validity needed for a renewal, ${f.fillsWithinValidity} on record.` })
  }
  if (f.openIncidents > 0) gaps.push({ code: 'OPEN_INCIDENT', message: 'An incident involving the member is still open.' })
  return gaps
}
