import { describe, expect, it } from 'vitest'
import { bookingRefusals, type BookingFacts } from '../../../server/services/bookings/rules'
import { localToInstant } from '../../../shared/utils/booking-time'

const Z = 'Europe/London'
const at = (local: string) => localToInstant(local, Z)
const base: BookingFacts = {
  status: 'active', coursesNotCurrent: [], junior: false,
  station: { adultsOnly: true, maxBookingMinutes: 240, openingHours: Array.from({ length: 7 }, () => ({ opens: '09:00', closes: '21:00' })), isBench: true },
  startsLocal: '2030-06-10T10:00', endsLocal: '2030-06-10T12:00', startsAt: at('2030-06-10T10:00'), endsAt: at('2030-06-10T12:00'),
  now: new Date('2030-06-01T00:00:00Z'), timeZone: Z, wantsCureHold: false,
}
const times = (s: string, e: string) => ({ startsLocal: s, endsLocal: e, startsAt: at(s), endsAt: at(e) })

describe('bookingRefusals', () => {
  it('refuses nothing within the rules', () => {
    expect(bookingRefusals(base)).toEqual([])
  })

  it.each<[string, Partial<BookingFacts>, string[]]>([
    ['grace', { status: 'grace' }, ['MEMBERSHIP_NOT_ACTIVE']],
    ['pending', { status: 'pending' }, ['MEMBERSHIP_NOT_ACTIVE']],
    ['a junior at an adults-only station', { junior: true }, ['ADULTS_ONLY']],
    ['a course expired', { coursesNotCurrent: [{ code: 'composite_ppe', name: 'Composite handling and PPE', standing: 'expired' }] }, ['COURSE_NOT_CURRENT']],
    ['a cure hold at a booth', { wantsCureHold: true, station: { ...base.station, isBench: false } }, ['CURE_HOLD_NOT_A_BENCH']],
    ['before opening', times('2030-06-10T08:00', '2030-06-10T10:00'), ['OUTSIDE_OPENING_HOURS']],
    ['over the longest booking', times('2030-06-10T09:00', '2030-06-10T13:01'), ['TOO_LONG']],
    ['in the past', { now: new Date('2030-06-10T10:00:00Z') }, ['IN_THE_PAST']],
    ['ending as it starts', times('2030-06-10T10:00', '2030-06-10T10:00'), ['END_NOT_AFTER_START']],
    ['a skipped wall-clock time', times('2030-03-31T01:30', '2030-03-31T03:00'), ['LOCAL_TIME_MISSING']],
    ['everything at once', { status: 'lapsed', junior: true, coursesNotCurrent: [{ code: 'composite_ppe', name: 'Composite handling and PPE', standing: 'never_taken' }], now: new Date('2031-01-01T00:00:00Z'), ...times('2030-06-10T07:00', '2030-06-10T12:00') },
      ['MEMBERSHIP_NOT_ACTIVE', 'COURSE_NOT_CURRENT', 'ADULTS_ONLY', 'IN_THE_PAST', 'TOO_LONG', 'OUTSIDE_OPENING_HOURS']],
  ])('%s', (_, change, codes) => {
    expect(bookingRefusals({ ...base, ...change }).map(r => r.code)).toEqual(codes)
  })

  it('names the course and its standing in words', () => {
    const [reason] = bookingRefusals({ ...base, coursesNotCurrent: [{ code: 'respirator_fit', name: 'Respirator fit test', standing: 'retraining_required' }] })
    expect(reason!.message).toMatch(/^Respirator fit test: retraining required\./)
  })
})
