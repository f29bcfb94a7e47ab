/**
 * Launch events and fill stations: THE rules on them, pure (the server, the pages and the seed use these).
 *
 * - A member registers for an event, and withdraws, until the day before it (the club's today is
 *   before the event's day); on the day only the event's staff add walk-ins. A cancelled event takes
 *   neither.
 * - A fill station may launch at the rated pressure of its lowest-rated part divided by the club's
 *   equipment factor (never below 3, common practice for launch equipment).
 * - A gauge calibrated on D every N months is current through D + N calendar months inclusive (the
 *   training validity rule); it is "due soon" within 30 days of that, and past due after it.
 */
import { addCalendarDays, addCalendarMonths } from './dates'
import type { Words } from './words'

/** The lowest equipment factor a club may set, and the one every club starts with. */
export const MIN_EQUIPMENT_FACTOR = 3
/** The highest equipment factor the policy takes. */
export const MAX_EQUIPMENT_FACTOR = 10

/** Days before its calibration runs out that a gauge is listed as due. */
export const GAUGE_DUE_WITHIN_DAYS = 30

/** The pressure a fill station may launch at, bar: its lowest rated part ÷ the equipment factor (at least 3). */
export function stationLaunchLimitBar(lowestPartRatingBar: number, equipmentFactor: number): number {
  return lowestPartRatingBar / Math.max(equipmentFactor, MIN_EQUIPMENT_FACTOR)
}

/** The last day a gauge calibrated on `calibratedOn` every `intervalMonths` months is current. */
export function gaugeCurrentThrough(calibratedOn: string, intervalMonths: number): string {
  return addCalendarMonths(calibratedOn, intervalMonths)
}

export const GAUGE_STATES = ['current', 'due_soon', 'past_due'] as const
export type GaugeState = typeof GAUGE_STATES[number]

export const GAUGE_STATE_WORDS: Record<GaugeState, Words> = {
  current: { label: 'Calibrated', meaning: 'The gauge\'s calibration is current.' },
  due_soon: { label: 'Calibration due soon', meaning: `The gauge's calibration runs out within ${GAUGE_DUE_WITHIN_DAYS} days: have it calibrated.` },
  past_due: { label: 'Past calibration', meaning: 'The gauge is past its calibration date: the station refuses fills until it is calibrated.' },
}

/** Where a gauge current through `currentThrough` stands on the club's `today`. */
export function gaugeState(currentThrough: string, today: string): GaugeState {
  if (today > currentThrough) return 'past_due'
  return addCalendarDays(today, GAUGE_DUE_WITHIN_DAYS) >= currentThrough ? 'due_soon' : 'current'
}

/** Why a member may not register for (or withdraw from) an event held on `heldOn`, or null when they may. */
export function registrationProblem(e: { heldOn: string, cancelled: boolean }, today: string): string | null {
  if (e.cancelled) return 'The event is cancelled.'
  if (today >= e.heldOn) return 'Registration closes the day before the event; on the day, ask the event\'s staff to add you as a walk-in.'
  return null
}

/** Why a walk-in may not be added to an event held on `heldOn`, or null when it may (on the day only). */
export function walkInProblem(e: { heldOn: string, cancelled: boolean }, today: string): string | null {
  if (e.cancelled) return 'The event is cancelled.'
  if (today !== e.heldOn) return 'Walk-ins are added on the event\'s day only.'
  return null
}

/** Why an event may not be changed (moved, edited or cancelled), or null: past and cancelled events stay as they were. */
export function eventChangeProblem(e: { heldOn: string, cancelled: boolean }, today: string): string | null {
  if (e.cancelled) return 'The event is cancelled.'
  if (e.heldOn < today) return 'The event is over: its record stays as it was.'
  return null
}

/** What a member may fill to at an event, bar: the lower of their tier's cap and the event's cap (0 with no tier). */
export function eventFillLimitBar(tierCapBar: number | null, eventCapBar: number): number {
  return tierCapBar === null ? 0 : Math.min(tierCapBar, eventCapBar)
}
