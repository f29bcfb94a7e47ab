import { describe, expect, it } from 'vitest'
import { formatCalendarDate, formatInstant } from '../../shared/utils/dates'

describe('date display', () => {
  it.each([
    ['2026-03-01', '1 March 2026'],
    ['2024-02-29', '29 February 2024'],
    ['2026-12-31', '31 December 2026'],
  ])('writes the calendar date %s as %s, whatever the zone', (date, expected) => {
    expect(formatCalendarDate(date)).toBe(expected)
  })

  it.each([
    ['Pacific/Auckland', '2 Mar 2026, 12:30'],
    ['America/Los_Angeles', '1 Mar 2026, 15:30'],
  ])('shows an instant in the club\'s zone (%s)', (zone, expected) => {
    expect(formatInstant('2026-03-01T23:30:00Z', zone)).toBe(expected)
  })
})
