import { describe, expect, it } from 'vitest'
import { instantToLocal, localToInstant, mondayOf, withinOpeningHours, type OpeningHours } from '../../../shared/utils/booking-time'

const LONDON = 'Europe/London'

describe('localToInstant: the club\'s wall clock to an instant', () => {
  it.each([
    ['2024-06-15T10:30', LONDON, '2024-06-15T09:30:00.000Z'], // BST, UTC+1
    ['2024-01-15T10:30', LONDON, '2024-01-15T10:30:00.000Z'], // GMT
    ['2024-10-27T00:30', LONDON, '2024-10-26T23:30:00.000Z'], // before the clocks go back (02:00 BST → 01:00 GMT)
    ['2024-10-27T01:30', LONDON, '2024-10-27T00:30:00.000Z'], // happens twice: the first time (BST)
    ['2024-10-27T02:00', LONDON, '2024-10-27T02:00:00.000Z'],
    ['2024-10-27T09:00', LONDON, '2024-10-27T09:00:00.000Z'],
    ['2024-03-31T00:59', LONDON, '2024-03-31T00:59:00.000Z'],
    ['2024-03-31T02:00', LONDON, '2024-03-31T01:00:00.000Z'], // just after the clocks go forward
    ['2024-11-03T01:30', 'America/New_York', '2024-11-03T05:30:00.000Z'], // twice there too: EDT first
    ['2024-07-01T12:00', 'Australia/Lord_Howe', '2024-07-01T01:30:00.000Z'], // a half-hour zone
  ])('%s in %s is %s', (local, zone, iso) => {
    expect(localToInstant(local, zone)?.toISOString()).toBe(iso)
  })

  it.each([
    ['2024-03-31T01:30', LONDON], // skipped when the clocks go forward
    ['2024-03-10T02:30', 'America/New_York'],
    ['2024-02-30T10:00', LONDON], // no such day
    ['2024-06-15T24:00', LONDON],
    ['2024-06-15 10:00', LONDON],
  ])('%s does not exist in %s: null', (local, zone) => {
    expect(localToInstant(local, zone)).toBeNull()
  })

  it('round-trips through instantToLocal', () => {
    for (const local of ['2024-06-15T10:30', '2024-10-27T00:30', '2024-10-27T03:00', '2025-01-01T00:00']) {
      expect(instantToLocal(localToInstant(local, LONDON)!, LONDON)).toBe(local)
    }
  })
})

describe('withinOpeningHours', () => {
  const weekdays: OpeningHours = [...Array.from({ length: 5 }, () => ({ opens: '09:00', closes: '21:00' })), null, { opens: '10:00', closes: '16:00' }]
  const allDay: OpeningHours = Array.from({ length: 7 }, () => ({ opens: '00:00', closes: '24:00' }))
  it.each([
    // 2024-06-10 is a Monday, 2024-06-15 a Saturday, 2024-06-16 a Sunday
    ['2024-06-10T09:00', '2024-06-10T21:00', weekdays, true],
    ['2024-06-10T08:59', '2024-06-10T10:00', weekdays, false],
    ['2024-06-10T20:00', '2024-06-10T21:01', weekdays, false],
    ['2024-06-15T10:00', '2024-06-15T11:00', weekdays, false], // closed on Saturdays
    ['2024-06-16T10:00', '2024-06-16T16:00', weekdays, true],
    ['2024-06-10T20:00', '2024-06-11T10:00', weekdays, false], // runs on through the night
    ['2024-06-10T20:00', '2024-06-12T10:00', allDay, true], // open round the clock
    ['2024-06-10T20:00', '2024-06-11T00:00', weekdays, false],
    ['2024-06-10T20:00', '2024-06-11T00:00', allDay, true], // ends at midnight: nothing of the next day
    ['2024-06-10T10:00', '2024-06-10T10:00', weekdays, false],
    ['2024-10-27T00:30', '2024-10-27T03:00', allDay, true], // the day the clocks go back keeps its wall-clock hours
  ] as const)('%s to %s: %s', (start, end, hours, expected) => {
    expect(withinOpeningHours(start, end, hours as OpeningHours)).toBe(expected)
  })
})

describe('mondayOf', () => {
  it.each([['2024-06-10', '2024-06-10'], ['2024-06-16', '2024-06-10'], ['2024-01-03', '2024-01-01'], ['2025-01-01', '2024-12-30']])('%s → %s', (d, m) => {
    expect(mondayOf(d)).toBe(m)
  })
})
