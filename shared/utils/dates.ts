// Calendar dates (YYYY-MM-DD, a club's day) and instants: arithmetic and how they are written out.
import { TZDate } from '@date-fns/tz'
import { addDays, format } from 'date-fns'

/** An instant (ISO string) as a short date and time in the club's time zone, e.g. "3 Mar 2026, 14:05". */
export function formatInstant(iso: string, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'short', timeZone }).format(new Date(iso))
}

/** A calendar date (YYYY-MM-DD) written out, e.g. "1 March 2026"; the date is not shifted by any zone. */
export function formatCalendarDate(date: string): string {
  return new Intl.DateTimeFormat('en-GB', { dateStyle: 'long', timeZone: 'UTC' }).format(new Date(`${date}T00:00:00Z`))
}

/** The calendar date (YYYY-MM-DD) at `instant` in the IANA time zone `timeZone`. */
export function dateInZone(instant: Date, timeZone: string): string {
  return format(new TZDate(instant.getTime(), timeZone), 'yyyy-MM-dd')
}

/** `date` (YYYY-MM-DD) plus `days` calendar days, as YYYY-MM-DD. */
export function addCalendarDays(date: string, days: number): string {
  const [y, m, d] = date.split('-').map(Number)
  return format(addDays(new Date(y!, m! - 1, d!), days), 'yyyy-MM-dd')
}

/** Calendar days from `from` to `to` (both YYYY-MM-DD); negative when `to` is earlier. */
export function daysBetween(from: string, to: string): number {
  const utc = (d: string) => {
    const [y, m, day] = d.split('-').map(Number)
    return Date.UTC(y!, m! - 1, day!)
  }
  return Math.round((utc(to) - utc(from)) / 86_400_000)
}

/**
 * `date` (YYYY-MM-DD) plus `months` calendar months, clamped to the month's last day
 * (29 February + 12 months = 28 February; 31 August + 6 months = 28 or 29 February).
 */
export function addCalendarMonths(date: string, months: number): string {
  const [y, m, d] = date.split('-').map(Number)
  const monthIndex = (m! - 1) + months
  const year = y! + Math.floor(monthIndex / 12)
  const month = ((monthIndex % 12) + 12) % 12
  const lastDay = new Date(Date.UTC(year, month + 1, 0)).getUTCDate()
  const day = Math.min(d!, lastDay)
  return `${String(year).padStart(4, '0')}-${String(month + 1).padStart(2, '0')}-${String(day).padStart(2, '0')}`
}
