/** An instant (ISO string) as a short date and time in the club's time zone, e.g. "3 Mar 2026, 14:05". */
export function formatInstant(iso: string, timeZone: string): string {
  return new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'short', timeZone }).format(new Date(iso))
}

/** A calendar date (YYYY-MM-DD) written out, e.g. "1 March 2026"; the date is not shifted by any zone. */
export function formatCalendarDate(date: string): string {
  return new Intl.DateTimeFormat('en-GB', { dateStyle: 'long', timeZone: 'UTC' }).format(new Date(`${date}T00:00:00Z`))
}
