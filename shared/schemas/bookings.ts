import { z } from 'zod'
import { isoDate } from './common'
import { LOCAL_DATE_TIME } from '../utils/booking-time'
import { MAX_CURE_HOLD_HOURS, STATION_KINDS } from '../utils/stations'

const HHMM = /^(?:[01]\d|2[0-3]):[0-5]\d$/

/** One day's opening window (`closes` may be `24:00`, midnight at the day's end) or null: closed. */
export const DayHoursSchema = z.object({
  opens: z.string().regex(HHMM, 'Use HH:MM'),
  closes: z.string().regex(/^(?:(?:[01]\d|2[0-3]):[0-5]\d|24:00)$/, 'Use HH:MM (24:00 for midnight)'),
}).strict().refine(v => v.closes > v.opens, { message: 'It must close after it opens', path: ['closes'] }).nullable()

const textLine = (max: number, required: string) => z.string().trim().min(1, required).max(max, `At most ${max} characters`)
  .refine(v => !/[\p{Cc}\p{Cf}\p{Zl}\p{Zp}]/u.test(v), 'Use one line of visible characters')

/** A station as an officer with `stations.manage` creates or changes it. */
export const StationSchema = z.object({
  name: textLine(80, 'Give the station a name'),
  kind: z.enum(STATION_KINDS, { errorMap: () => ({ message: 'Choose a kind of station' }) }),
  requiredCourses: z.array(z.string().regex(/^[a-z][a-z0-9_]{1,39}$/, 'Not a course code').max(40)).max(10, 'At most 10 courses')
    .transform(codes => [...new Set(codes)]),
  maxBookingMinutes: z.number().int('Whole minutes').min(15, 'At least 15 minutes').max(10_080, 'At most 7 days (10 080 minutes)'),
  openingHours: z.array(DayHoursSchema).length(7, 'Give all seven days, Monday first'),
  adultsOnly: z.boolean(),
  position: z.number().int().min(0).max(999).optional(),
}).strict()
export type StationInput = z.infer<typeof StationSchema>

/** A wall-clock time in the club's zone, `YYYY-MM-DDTHH:MM`. */
const localDateTime = z.string().regex(LOCAL_DATE_TIME, 'Use YYYY-MM-DDTHH:MM').max(16)

/**
 * A member books a station from `startsAt` to `endsAt`, wall-clock times in the club's time zone; a
 * laminating booking may ask for a cure hold of `cureHoldHours` on the cure rack from its end.
 */
export const BookingSchema = z.object({
  stationId: z.string().uuid('Choose a station').transform(id => id.toLowerCase()),
  startsAt: localDateTime,
  endsAt: localDateTime,
  note: z.string().trim().max(200, 'At most 200 characters').optional(),
  cureHoldHours: z.number().int('Whole hours').min(1, 'At least 1 hour').max(MAX_CURE_HOLD_HOURS, `At most ${MAX_CURE_HOLD_HOURS} hours (7 days)`).nullable().optional(),
}).strict()
export type BookingInput = z.infer<typeof BookingSchema>

/** Cancelling a booking: an officer cancelling someone else's gives the reason. */
export const BookingCancelSchema = z.object({
  reason: z.string().trim().max(500, 'At most 500 characters').optional(),
}).strict()
export type BookingCancel = z.infer<typeof BookingCancelSchema>

/** The week view: the week holding `week` (any day of it; default this week), one station or all. */
export const BookingWeekQuerySchema = z.object({
  week: isoDate.optional(),
  stationId: z.string().uuid('Not a valid id').transform(id => id.toLowerCase()).optional(),
})

/** Renewing the private calendar link (the old one stops working at once). */
export const CalendarFeedRenewSchema = z.object({
  renew: z.literal(true, { errorMap: () => ({ message: 'Confirm that the old link should stop working' }) }),
}).strict()

/** A calendar-feed token as the link carries it (32 random bytes, base64url). */
export const CalendarFeedTokenParamSchema = z.object({ token: z.string().regex(/^[A-Za-z0-9_-]{43}$/) })
