import { addCalendarDays, addCalendarMonths } from './dates'
import type { Words } from './words'

/**
 * THE training validity rule, used everywhere (records, rosters, bookings, notices): a record dated D
 * (its last training day) with a course validity of N months is current through D + N calendar months
 * inclusive, clamped to the month's end (29 February + 12 months = 28 February). A respirator fit test
 * on 2024-03-01 with 12 months is due by 2025-03-01 (29 CFR 1910.134(f)(2): at least every 12 months).
 */
export function trainingExpiresOn(trainedOn: string, validityMonths: number): string {
  if (!Number.isInteger(validityMonths) || validityMonths < 1) throw new RangeError(`A validity is a whole number of months, at least 1 (got ${validityMonths}).`)
  return addCalendarMonths(trainedOn, validityMonths)
}

/** How a member stands in one course on the club's today. */
export const COURSE_STANDINGS = ['current', 'expiring', 'expired', 'retraining_required', 'never_taken'] as const
export type CourseStanding = typeof COURSE_STANDINGS[number]

export const COURSE_STANDING_WORDS: Record<CourseStanding, Words> = {
  current: { label: 'Current', meaning: 'Passed, and current through its expiry date.' },
  expiring: { label: 'Expiring soon', meaning: 'Still current, but it expires within the warning window: book a refresher.' },
  expired: { label: 'Expired', meaning: 'Its expiry date has passed: take the course again.' },
  retraining_required: { label: 'Retraining required', meaning: 'An instructor or the safety officer flagged it: not current until a new record is issued.' },
  never_taken: { label: 'Never taken', meaning: 'No passing record of this course.' },
}

/** Days ahead the member's course list calls a current record "expiring soon". */
export const EXPIRING_WITHIN_DAYS = 60

/** The facts of a member's latest passing record of a course, as the standing rule needs them. */
export interface LatestRecord {
  expiresOn: string
  retrainingRequired: boolean
}

/**
 * Where a member stands in a course on `today` (YYYY-MM-DD, the club's), from their latest passing
 * record (null: never taken). Expiring means current with the expiry within `withinDays` days.
 */
export function courseStanding(latest: LatestRecord | null, today: string, withinDays = EXPIRING_WITHIN_DAYS): CourseStanding {
  if (!latest) return 'never_taken'
  if (latest.retrainingRequired) return 'retraining_required'
  if (latest.expiresOn < today) return 'expired'
  return latest.expiresOn <= addCalendarDays(today, withinDays) ? 'expiring' : 'current'
}

/** Whether a standing lets the member do what the course guards (a booking, a tier). */
export function isCurrentStanding(standing: CourseStanding): boolean {
  return standing === 'current' || standing === 'expiring'
}
