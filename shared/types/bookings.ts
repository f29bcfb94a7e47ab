import type { CourseStanding } from '../utils/training-validity'
import type { OpeningHours } from '../utils/booking-time'
import type { StationKind } from '../utils/stations'

/** A workshop station as every member sees it. */
export interface StationDto {
  id: string
  name: string
  kind: StationKind
  /** Courses a member must be current in, by code and the club's name for them. */
  requiredCourses: { code: string, name: string }[]
  maxBookingMinutes: number
  /** Seven days, Monday first; wall-clock times in the club's zone. */
  openingHours: OpeningHours
  adultsOnly: boolean
  position: number
}

/** One booking. Instants are ISO UTC; `startsLocal`/`endsLocal` are the club's wall clock. */
export interface BookingDto {
  id: string
  station: { id: string, name: string, kind: StationKind }
  startsAt: string
  endsAt: string
  startsLocal: string
  endsLocal: string
  /** Whose it is: the booker's name for their own bookings and for officers, otherwise null. */
  member: { id: string, name: string } | null
  mine: boolean
  note: string
  /** For a cure hold: the bench booking it follows. */
  cureForBookingId: string | null
  cancelledAt: string | null
  cancelReason: string | null
}

/** A booking made, with the cure hold taken with it, if one was asked for. */
export interface BookingMadeDto {
  booking: BookingDto
  cureHold: BookingDto | null
}

/** The week view: Monday to Sunday (club dates), the stations shown and their live bookings. */
export interface BookingWeekDto {
  weekStart: string
  days: string[]
  timeZone: string
  stations: StationDto[]
  bookings: BookingDto[]
}

/** A course a refusal names, with the member's standing in it. */
export interface BookingCourseReason { code: string, name: string, standing: CourseStanding }

/** The state of the member's private calendar link; `url` only right after renewing. */
export interface CalendarFeedDto {
  active: boolean
  createdAt: string | null
  url?: string
}
