// Workshop booking times: wall-clock times in the club's time zone, and the pure rules about them.
import { TZDate, tzOffset } from '@date-fns/tz'
import { format } from 'date-fns'

/** A wall-clock time in the club's zone, `YYYY-MM-DDTHH:MM` (no seconds, no offset). */
export const LOCAL_DATE_TIME = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/

/** Weekdays as opening hours list them: Monday first (ISO 8601). */
export const WEEKDAYS = ['mon', 'tue', 'wed', 'thu', 'fri', 'sat', 'sun'] as const
export const WEEKDAY_LABELS = ['Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday', 'Sunday'] as const

/** One day's opening window, wall-clock `HH:MM` (closes may be `24:00`); null when closed all day. */
export type DayHours = { opens: string, closes: string } | null
/** Seven days of opening hours, Monday first. */
export type OpeningHours = DayHours[]

const HOUR = 3_600_000

/**
 * The instant at wall-clock time `local` (`YYYY-MM-DDTHH:MM`) in IANA zone `timeZone`, or null when
 * that time does not exist there (skipped when the clocks go forward). A time that happens twice
 * (when the clocks go back) is its first occurrence. Works from the zone's UTC offsets (tzOffset,
 * from the IANA database through Intl): each offset in force around that day is tried, and kept when
 * the zone really has that offset at the resulting instant.
 */
export function localToInstant(local: string, timeZone: string): Date | null {
  const m = LOCAL_DATE_TIME.exec(local)
  if (!m) return null
  const [, y, mo, d, h, mi] = m.map(Number) as [number, number, number, number, number, number]
  if (h > 23 || mi > 59) return null
  const wallMs = Date.UTC(y, mo - 1, d, h, mi)
  if (new Date(wallMs).toISOString().slice(0, 10) !== local.slice(0, 10)) return null
  // Offsets (minutes east of UTC) in force a day and a half either side: no zone changes twice in that span.
  const offsets = [...new Set([-36, 0, 36].map(dh => tzOffset(timeZone, new Date(wallMs + dh * HOUR))))]
  const instants = offsets.map(o => wallMs - o * 60_000).filter(t => tzOffset(timeZone, new Date(t)) * 60_000 === wallMs - t)
  return instants.length ? new Date(Math.min(...instants)) : null
}

/** Instant `instant` as wall-clock `YYYY-MM-DDTHH:MM` in IANA zone `timeZone`. */
export function instantToLocal(instant: Date, timeZone: string): string {
  return format(new TZDate(instant.getTime(), timeZone), 'yyyy-MM-dd\'T\'HH:mm')
}

/** Minutes after midnight of `HH:MM` (`24:00` → 1440). */
export function minutesOfDay(hhmm: string): number {
  const [h, m] = hhmm.split(':').map(Number)
  return h! * 60 + m!
}

/** Monday-first weekday index (0–6) of calendar date `date` (YYYY-MM-DD). */
export function weekdayIndex(date: string): number {
  const day = new Date(`${date}T00:00:00Z`).getUTCDay()
  return (day + 6) % 7
}

function nextDate(date: string): string {
  const t = new Date(`${date}T00:00:00Z`)
  t.setUTCDate(t.getUTCDate() + 1)
  return t.toISOString().slice(0, 10)
}

/**
 * Whether wall-clock range [`startLocal`, `endLocal`) lies inside `hours`: every calendar day it
 * touches must be open for the part of that day it covers (a range may run on into the next day only
 * where both days' windows meet at midnight). Compares wall clocks, so a day when the clocks change
 * keeps its posted hours.
 */
export function withinOpeningHours(startLocal: string, endLocal: string, hours: OpeningHours): boolean {
  if (endLocal <= startLocal) return false
  const [startDate, startTime] = startLocal.split('T') as [string, string]
  const [endDate, endTime] = endLocal.split('T') as [string, string]
  for (let date = startDate, guard = 0; date <= endDate && guard < 400; date = nextDate(date), guard++) {
    const from = date === startDate ? minutesOfDay(startTime) : 0
    const to = date === endDate ? minutesOfDay(endTime) : 1440
    if (to <= from) continue
    const day = hours[weekdayIndex(date)]
    if (!day || from < minutesOfDay(day.opens) || to > minutesOfDay(day.closes)) return false
  }
  return true
}

/** "09:00–21:00" or "Closed", for one day of opening hours. */
export function dayHoursText(day: DayHours): string {
  return day ? `${day.opens}–${day.closes}` : 'Closed'
}

/** Monday (YYYY-MM-DD) of the week holding calendar date `date`. */
export function mondayOf(date: string): string {
  const t = new Date(`${date}T00:00:00Z`)
  t.setUTCDate(t.getUTCDate() - weekdayIndex(date))
  return t.toISOString().slice(0, 10)
}
