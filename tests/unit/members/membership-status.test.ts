import { afterEach, describe, expect, it } from 'vitest'
import {
  ageOn, membershipStatus, statusKeepsRights, type MembershipStatus, type MembershipStatusInput,
} from '../../../shared/utils/membership-status'
import { addCalendarDays, dateInZone, daysBetween } from '../../../shared/utils/dates'

// A fixed instant: noon UTC on 15 June 2026 is 15 June in London (BST, UTC+1).
const NOW = new Date('2026-06-15T12:00:00Z')
const LONDON = 'Europe/London'
const TODAY = '2026-06-15'
const day = (n: number) => addCalendarDays(TODAY, n)
const at = (input: MembershipStatusInput, graceDays?: number) => membershipStatus(input, { timeZone: LONDON, graceDays, now: NOW })

describe('membershipStatus: each status', () => {
  it.each<[string, MembershipStatusInput, MembershipStatus]>([
    ['never paid → pending', { paidThrough: null }, 'pending'],
    ['paid well ahead → active', { paidThrough: day(200) }, 'active'],
    ['paid 1 day past, within grace → grace', { paidThrough: day(-1) }, 'grace'],
    ['paid 60 days past → lapsed', { paidThrough: day(-60) }, 'lapsed'],
    ['suspended by the admin → suspended', { paidThrough: day(100), suspendedAt: new Date('2026-06-01T10:00:00Z') }, 'suspended'],
    ['resigned → resigned', { paidThrough: day(100), resignedAt: '2026-06-01T10:00:00Z' }, 'resigned'],
  ])('%s', (_label, input, expected) => {
    expect(at(input)).toBe(expected)
  })
})

describe('membershipStatus: grace boundaries (30 grace days)', () => {
  it.each<[number, MembershipStatus]>([
    [1, 'active'],
    [0, 'active'], // paid through today: still active today
    [-1, 'grace'], // ran out yesterday
    [-29, 'grace'],
    [-30, 'grace'], // the last day of grace
    [-31, 'lapsed'], // the first day past it
  ])('paid through today %+d → %s', (offset, expected) => {
    expect(at({ paidThrough: day(offset) }, 30)).toBe(expected)
  })

  it('defaults to 30 grace days when the club sets none', () => {
    expect(at({ paidThrough: day(-30) })).toBe('grace')
    expect(at({ paidThrough: day(-31) })).toBe('lapsed')
  })
})

describe('membershipStatus: the club\'s own grace days', () => {
  it.each<[number, number, MembershipStatus]>([
    [0, 0, 'active'],
    [0, -1, 'lapsed'], // no grace: lapsed the day after
    [7, -7, 'grace'],
    [7, -8, 'lapsed'],
    [90, -90, 'grace'],
    [90, -91, 'lapsed'],
  ])('%d grace days, paid through today %+d → %s', (graceDays, offset, expected) => {
    expect(at({ paidThrough: day(offset) }, graceDays)).toBe(expected)
  })
})

describe('membershipStatus: the admin\'s actions win over dues', () => {
  const suspendedAt = new Date('2026-06-01T10:00:00Z')
  const resignedAt = new Date('2026-05-01T10:00:00Z')
  it.each<[string, MembershipStatusInput, MembershipStatus]>([
    ['suspended wins over resigned', { paidThrough: day(10), suspendedAt, resignedAt }, 'suspended'],
    ['suspended wins over active dues', { paidThrough: day(300), suspendedAt }, 'suspended'],
    ['suspended wins over never paid', { paidThrough: null, suspendedAt }, 'suspended'],
    ['suspended wins over lapsed dues', { paidThrough: day(-400), suspendedAt }, 'suspended'],
    ['resigned wins over active dues', { paidThrough: day(300), resignedAt }, 'resigned'],
    ['resigned wins over grace', { paidThrough: day(-3), resignedAt }, 'resigned'],
    ['resigned wins over never paid', { paidThrough: null, resignedAt }, 'resigned'],
  ])('%s', (_label, input, expected) => {
    expect(at(input)).toBe(expected)
  })

  it.each<[MembershipStatus, boolean]>([
    ['pending', true], ['active', true], ['grace', true], ['lapsed', true], ['suspended', false], ['resigned', false],
  ])('%s keeps role rights: %s', (status, keeps) => {
    expect(statusKeepsRights(status)).toBe(keeps)
  })
})

describe('"today" is the club\'s calendar date, not the server\'s', () => {
  // 23:30 UTC on 1 March 2026: 12:30 on 2 March in Auckland (NZDT, UTC+13), 15:30 on 1 March in Los Angeles (PST, UTC-8).
  const instant = new Date('2026-03-01T23:30:00Z')

  it.each([
    ['Pacific/Auckland', '2026-03-02'],
    ['America/Los_Angeles', '2026-03-01'],
    ['UTC', '2026-03-01'],
  ])('at 2026-03-01T23:30Z the date in %s is %s', (zone, expected) => {
    expect(dateInZone(instant, zone)).toBe(expected)
  })

  it.each([
    ['America/Los_Angeles', 'active'],
    ['Pacific/Auckland', 'grace'],
  ])('a member paid through 2026-03-01 is, in %s, %s', (zone, expected) => {
    expect(membershipStatus({ paidThrough: '2026-03-01' }, { timeZone: zone, now: instant })).toBe(expected)
  })
})

describe('days on which the clocks change', () => {
  // Europe/London: BST starts 2026-03-29 01:00 UTC and ends 2026-10-25 01:00 UTC.
  // America/New_York: EDT starts 2026-03-08 07:00 UTC.
  it.each([
    ['2026-03-29T00:30:00Z', LONDON, '2026-03-29'], // 00:30 GMT, just before the change
    ['2026-03-29T23:30:00Z', LONDON, '2026-03-30'], // 00:30 BST the next day
    ['2026-10-24T23:30:00Z', LONDON, '2026-10-25'], // 00:30 BST on the day summer time ends
    ['2026-10-25T23:30:00Z', LONDON, '2026-10-25'], // 23:30 GMT the same day
    ['2026-03-08T04:30:00Z', 'America/New_York', '2026-03-07'], // 23:30 EST the evening before
    ['2026-03-09T03:30:00Z', 'America/New_York', '2026-03-08'], // 23:30 EDT on the change day
  ])('%s is %s in %s', (iso, zone, expected) => {
    expect(dateInZone(new Date(iso), zone)).toBe(expected)
  })

  it('a member paid through the day before the change is in grace on the change day, active the evening before', () => {
    const paid = { paidThrough: '2026-03-28' }
    expect(membershipStatus(paid, { timeZone: LONDON, now: new Date('2026-03-28T23:59:00Z') })).toBe('active')
    expect(membershipStatus(paid, { timeZone: LONDON, now: new Date('2026-03-29T00:00:00Z') })).toBe('grace')
    expect(membershipStatus(paid, { timeZone: LONDON, graceDays: 1, now: new Date('2026-03-30T22:59:00Z') })).toBe('lapsed')
  })

  describe('calendar arithmetic does not depend on the server\'s zone', () => {
    const original = process.env.TZ
    afterEach(() => {
      process.env.TZ = original
    })

    it('switching the zone takes effect: São Paulo\'s midnight of 2018-11-04 never happened (summer time began then)', () => {
      process.env.TZ = 'America/Sao_Paulo'
      expect(new Date(2018, 10, 4).getHours()).toBe(1)
    })

    it.each(['UTC', 'Europe/London', 'America/Sao_Paulo', 'Pacific/Auckland', 'America/New_York'])('with the server in %s', (zone) => {
      process.env.TZ = zone
      expect(addCalendarDays('2018-11-03', 1)).toBe('2018-11-04')
      expect(addCalendarDays('2018-11-04', 1)).toBe('2018-11-05')
      expect(addCalendarDays('2026-03-28', 1)).toBe('2026-03-29')
      expect(addCalendarDays('2026-03-29', 1)).toBe('2026-03-30')
      expect(addCalendarDays('2026-10-25', -1)).toBe('2026-10-24')
      expect(daysBetween('2026-03-01', '2026-04-01')).toBe(31)
      expect(daysBetween('2026-10-01', '2026-11-01')).toBe(31)
    })
  })
})

describe('addCalendarDays around leap days', () => {
  it.each([
    ['2024-02-28', 1, '2024-02-29'],
    ['2024-02-29', 1, '2024-03-01'],
    ['2024-03-01', -1, '2024-02-29'],
    ['2025-02-28', 1, '2025-03-01'], // no 29 February in 2025
    ['2023-12-31', 60, '2024-02-29'],
    ['2024-02-29', 365, '2025-02-28'],
    ['2024-02-29', 366, '2025-03-01'],
    ['2100-02-28', 1, '2100-03-01'], // 2100 is not a leap year
    ['2000-02-28', 1, '2000-02-29'], // 2000 is
    ['2026-12-31', 1, '2027-01-01'],
    ['2026-06-15', 0, '2026-06-15'],
  ])('%s %+d days → %s', (date, days, expected) => {
    expect(addCalendarDays(date, days)).toBe(expected)
  })

  it('grace after a 29 February paid-through ends 30 days later, on 30 March', () => {
    const paid = { paidThrough: '2024-02-29' }
    const noonUtc = (d: string) => new Date(`${d}T12:00:00Z`)
    expect(membershipStatus(paid, { timeZone: 'UTC', now: noonUtc('2024-03-30') })).toBe('grace')
    expect(membershipStatus(paid, { timeZone: 'UTC', now: noonUtc('2024-03-31') })).toBe('lapsed')
  })
})

describe('daysBetween', () => {
  it.each([
    ['2026-06-15', '2026-06-15', 0],
    ['2026-06-15', '2026-06-16', 1],
    ['2026-06-15', '2026-06-14', -1],
    ['2024-02-28', '2024-03-01', 2],
    ['2025-02-28', '2025-03-01', 1],
    ['2026-01-01', '2027-01-01', 365],
    ['2024-01-01', '2025-01-01', 366],
  ])('%s → %s is %d days', (from, to, expected) => {
    expect(daysBetween(from, to)).toBe(expected)
  })
})

describe('ageOn', () => {
  it.each([
    ['2008-06-16', '2026-06-15', 17], // 18th birthday tomorrow
    ['2008-06-15', '2026-06-15', 18], // 18th birthday today
    ['2008-06-14', '2026-06-15', 18],
    ['2008-12-31', '2026-01-01', 17],
    ['2008-01-01', '2025-12-31', 17],
    ['2008-02-29', '2026-02-28', 17], // a leap-day baby, in a year without 29 February …
    ['2008-02-29', '2026-03-01', 18], // … has the birthday counted on 1 March
    ['2008-02-29', '2028-02-28', 19],
    ['2008-02-29', '2028-02-29', 20],
    ['2026-06-15', '2026-06-15', 0],
  ])('born %s, on %s → %d', (born, on, expected) => {
    expect(ageOn(born, on)).toBe(expected)
  })
})
