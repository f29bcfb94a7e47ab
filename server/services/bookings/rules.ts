// The booking rules as a pure function: every reason a booking is refused, all at once.
import type { Reason } from '../../utils/errors'
import type { BookingCourseReason } from '#shared/types/bookings'
import { withinOpeningHours, type OpeningHours } from '#shared/utils/booking-time'
import { MEMBERSHIP_STATUS_WORDS, type MembershipStatus } from '#shared/utils/membership-status'
import { COURSE_STANDING_WORDS } from '#shared/utils/training-validity'

/** Reason codes a booking refusal may carry (422 `reasons[].code`). */
export const BOOKING_REFUSALS = [
  'MEMBERSHIP_NOT_ACTIVE', 'COURSE_NOT_CURRENT', 'ADULTS_ONLY', 'OUTSIDE_OPENING_HOURS', 'TOO_LONG', 'IN_THE_PAST',
  'END_NOT_AFTER_START', 'LOCAL_TIME_MISSING', 'CURE_HOLD_NOT_A_BENCH',
] as const

export interface BookingFacts {
  status: MembershipStatus
  /** Required courses the member is not current in on the club's today. */
  coursesNotCurrent: BookingCourseReason[]
  junior: boolean
  station: { adultsOnly: boolean, maxBookingMinutes: number, openingHours: OpeningHours, isBench: boolean }
  /** Wall-clock times as entered, and the instants they are (null: that time does not exist in the zone). */
  startsLocal: string
  endsLocal: string
  startsAt: Date | null
  endsAt: Date | null
  now: Date
  timeZone: string
  wantsCureHold: boolean
}

const minutesText = (min: number) => (min % 60 === 0 ? `${min / 60} hour${min === 60 ? '' : 's'}` : `${min} minutes`)

/** Every reason the booking described by `facts` is refused; empty when it may be made. */
export function bookingRefusals(f: BookingFacts): (Reason & { course?: BookingCourseReason })[] {
  const reasons: (Reason & { course?: BookingCourseReason })[] = []
  // Grace keeps training but not booking: only an active membership books (membership-status.ts).
  if (f.status !== 'active') {
    reasons.push({ code: 'MEMBERSHIP_NOT_ACTIVE', message: `Your membership is not active (${MEMBERSHIP_STATUS_WORDS[f.status].label}): only active members book stations.` })
  }
  for (const course of f.coursesNotCurrent) {
    reasons.push({ code: 'COURSE_NOT_CURRENT', course, message: `${course.name}: ${COURSE_STANDING_WORDS[course.standing].label.toLowerCase()}. This station needs it current.` })
  }
  if (f.station.adultsOnly && f.junior) {
    reasons.push({ code: 'ADULTS_ONLY', message: 'This station is for adults only: composite work is not for members under 18.' })
  }
  if (f.wantsCureHold && !f.station.isBench) {
    reasons.push({ code: 'CURE_HOLD_NOT_A_BENCH', message: 'Only a laminating-bench booking can ask for a cure hold.' })
  }
  for (const [at, local] of [[f.startsAt, f.startsLocal], [f.endsAt, f.endsLocal]] as const) {
    if (!at) reasons.push({ code: 'LOCAL_TIME_MISSING', message: `${local.replace('T', ' ')} does not exist in ${f.timeZone} (the clocks go forward then).` })
  }
  if (!f.startsAt || !f.endsAt) return reasons
  if (f.endsAt <= f.startsAt) {
    reasons.push({ code: 'END_NOT_AFTER_START', message: 'The booking must end after it starts.' })
    return reasons
  }
  if (f.startsAt < f.now) reasons.push({ code: 'IN_THE_PAST', message: 'The booking starts in the past.' })
  const minutes = (f.endsAt.getTime() - f.startsAt.getTime()) / 60_000
  if (minutes > f.station.maxBookingMinutes) {
    reasons.push({ code: 'TOO_LONG', message: `Too long: this station is booked for at most ${minutesText(f.station.maxBookingMinutes)} at a time.` })
  }
  if (!withinOpeningHours(f.startsLocal, f.endsLocal, f.station.openingHours)) {
    reasons.push({ code: 'OUTSIDE_OPENING_HOURS', message: 'Outside the station\'s opening hours.' })
  }
  return reasons
}
