/**
 * The membership status function: the one place that derives a member's standing from dues and the
 * admin's actions. Everything else (server rules, screens, notices, the directory's SQL filter, which
 * mirrors it) follows this definition.
 *
 * - suspended / resigned: set by an admin, and win over dues (suspended first).
 * - pending: never paid (no paid-through date).
 * - active: paid through today or later.
 * - grace: paid-through date has passed by at most the club's grace days (default 30): can train,
 *   cannot fill or book.
 * - lapsed: past the grace period.
 * "Today" is the calendar date in the club's time zone, never the server's.
 */
import { addCalendarDays, dateInZone } from './dates'
import type { Words } from './words'

export const MEMBERSHIP_STATUSES = ['pending', 'active', 'grace', 'lapsed', 'suspended', 'resigned'] as const
export type MembershipStatus = typeof MEMBERSHIP_STATUSES[number]

/**
 * Each status in words: the label every page, filter and card shows and the sentence that explains
 * it (the dashboard's hints, the chips' titles). The one place these words live.
 */
export const MEMBERSHIP_STATUS_WORDS: Record<MembershipStatus, Words> = {
  pending: { label: 'Awaiting approval or first dues', meaning: 'Signed up and waiting for approval, or approved with the first dues not paid yet.' },
  active: { label: 'Active', meaning: 'Dues paid through today or later.' },
  grace: { label: 'Grace period', meaning: 'Dues ran out lately: can train, cannot fill or book until renewed.' },
  lapsed: { label: 'Lapsed', meaning: 'Past the grace period: must renew before training again.' },
  suspended: { label: 'Suspended', meaning: 'Suspended by the admin: no training, booking or fill until reinstated.' },
  resigned: { label: 'Resigned', meaning: 'Left the club; the admin can let them rejoin.' },
}

/** Each status's label (from MEMBERSHIP_STATUS_WORDS). */
export const MEMBERSHIP_STATUS_LABELS = Object.fromEntries(MEMBERSHIP_STATUSES
  .map(s => [s, MEMBERSHIP_STATUS_WORDS[s].label])) as Record<MembershipStatus, string>

export const DEFAULT_GRACE_DAYS = 30

/** Days before the paid-through date that renewal is due: the standing page flags it and the reminder e-mail goes out. */
export const DUES_RENEWAL_NOTICE_DAYS = 30

export interface MembershipStatusInput {
  /** Calendar date (YYYY-MM-DD) the dues are paid through, or null when never paid. */
  paidThrough: string | null
  suspendedAt?: Date | string | null
  resignedAt?: Date | string | null
}

/** Derives the status at `now` (default: the current instant) for a club in `timeZone`. */
export function membershipStatus(
  input: MembershipStatusInput,
  opts: { timeZone: string, graceDays?: number, now?: Date },
): MembershipStatus {
  if (input.suspendedAt) return 'suspended'
  if (input.resignedAt) return 'resigned'
  if (!input.paidThrough) return 'pending'
  const today = dateInZone(opts.now ?? new Date(), opts.timeZone)
  if (input.paidThrough >= today) return 'active'
  const graceEnds = addCalendarDays(input.paidThrough, opts.graceDays ?? DEFAULT_GRACE_DAYS)
  return today <= graceEnds ? 'grace' : 'lapsed'
}

/** Whether this status keeps the member's role capabilities (suspended and resigned lose them). */
export function statusKeepsRights(status: MembershipStatus): boolean {
  return status !== 'suspended' && status !== 'resigned'
}

/** Age in whole years on `today` (YYYY-MM-DD) for someone born on `birthDate` (YYYY-MM-DD). */
export function ageOn(birthDate: string, today: string): number {
  const [by, bm, bd] = birthDate.split('-').map(Number)
  const [ty, tm, td] = today.split('-').map(Number)
  let age = ty! - by!
  if (tm! < bm! || (tm === bm && td! < bd!)) age -= 1
  return age
}

export const ADULT_AGE = 18

/**
 * Whether someone born on `birthDate` (YYYY-MM-DD) is a junior — under 18 — on `today` (YYYY-MM-DD,
 * the club's calendar date). An unknown birth date is not a junior.
 */
export function isJunior(birthDate: string | null | undefined, today: string): boolean {
  return !!birthDate && ageOn(birthDate, today) < ADULT_AGE
}
