import { beforeAll, describe, expect, it } from 'vitest'
import { api } from '../../support/http'
import { sql } from '../../support/db'
import { clubDay, makeBooking, makeStation, makeTrainingRecord, ago, fromNow, noticesOf, openEveryDay, type MadeMember } from '../../support/factories'
import { book, bookingClub, member, type SignedIn } from './support'
import type { BookingDto, BookingWeekDto } from '../../../shared/types/bookings'

const WEEKDAYS_9_TO_17 = [...Array.from({ length: 7 }, () => ({ opens: '09:00', closes: '17:00' }))]

describe('POST /api/bookings: the refusals, every reason at once', () => {
  let clubId: string
  let trainer: MadeMember
  let bench: string
  let adult: SignedIn

  beforeAll(async () => {
    ({ clubId, trainer } = await bookingClub())
    bench = (await makeStation({ clubId, name: 'Bench', requiredCourses: ['composite_ppe'], maxBookingMinutes: 60, openingHours: WEEKDAYS_9_TO_17, adultsOnly: true })).stationId
    adult = await member(clubId, trainer.memberId, ['composite_ppe'])
  })

  it('a junior in grace without the course, outside the hours, too long and in the past: 422 with all six reasons', async () => {
    const junior = await member(clubId, trainer.memberId, [], { paidDays: -5, birthDate: clubDay(-15 * 365), guardianConsent: true })
    const res = await book(junior.cookie, { stationId: bench, startsAt: `${clubDay(-1)}T07:00`, endsAt: `${clubDay(-1)}T12:00` })
    expect(res.status).toBe(422)
    expect(res.body.data.reasons.map(r => r.code).sort()).toEqual(['ADULTS_ONLY', 'COURSE_NOT_CURRENT', 'IN_THE_PAST', 'MEMBERSHIP_NOT_ACTIVE', 'OUTSIDE_OPENING_HOURS', 'TOO_LONG'])
    expect(res.body.data.reasons.find(r => r.code === 'COURSE_NOT_CURRENT')).toMatchObject({ course: { code: 'composite_ppe', standing: 'never_taken' } })
    expect(res.body.data.reasons.find(r => r.code === 'COURSE_NOT_CURRENT')!.message).toMatch(/Composite handling and PPE: never taken/)
    expect((await sql('SELECT 1 FROM bookings WHERE station_id = $1', [bench])).length).toBe(0)
  })

  it('names each course not current and why: expired, retraining required, never taken', async () => {
    const station = (await makeStation({ clubId, requiredCourses: ['composite_ppe', 'respirator_fit', 'rig_operator'] })).stationId
    const m = await member(clubId, trainer.memberId)
    await makeTrainingRecord({ memberId: m.memberId, course: 'composite_ppe', trainerId: trainer.memberId, trainedOn: clubDay(-800), expiresOn: clubDay(-70) })
    await makeTrainingRecord({ memberId: m.memberId, course: 'respirator_fit', trainerId: trainer.memberId, retrainingReason: 'changed_ppe' })
    const res = await book(m.cookie, { stationId: station, startsAt: `${clubDay(5)}T10:00`, endsAt: `${clubDay(5)}T11:00` })
    expect(res.status).toBe(422)
    expect(res.body.data.reasons.map(r => [r.code, r.course?.code, r.course?.standing])).toEqual([
      ['COURSE_NOT_CURRENT', 'composite_ppe', 'expired'],
      ['COURSE_NOT_CURRENT', 'respirator_fit', 'retraining_required'],
      ['COURSE_NOT_CURRENT', 'rig_operator', 'never_taken'],
    ])
  })

  it.each([
    ['grace', { paidDays: -5 }],
    ['lapsed', { paidDays: -90 }],
  ])('a member in %s cannot book: MEMBERSHIP_NOT_ACTIVE alone', async (_, o) => {
    const m = await member(clubId, trainer.memberId, ['composite_ppe'], o)
    const res = await book(m.cookie, { stationId: bench, startsAt: `${clubDay(3)}T10:00`, endsAt: `${clubDay(3)}T11:00` })
    expect(res.status).toBe(422)
    expect(res.body.data.reasons.map(r => r.code)).toEqual(['MEMBERSHIP_NOT_ACTIVE'])
  })

  it.each([
    ['OUTSIDE_OPENING_HOURS', `${clubDay(3)}T16:30`, `${clubDay(3)}T17:30`],
    ['TOO_LONG', `${clubDay(3)}T09:00`, `${clubDay(3)}T10:01`],
    ['IN_THE_PAST', `${clubDay(-2)}T10:00`, `${clubDay(-2)}T11:00`],
    ['END_NOT_AFTER_START', `${clubDay(3)}T11:00`, `${clubDay(3)}T11:00`],
    ['LOCAL_TIME_MISSING', '2031-03-30T01:30', '2031-03-30T02:15'], // the clocks go forward at 01:00 GMT in Europe/London
  ])('an adult current in the course, but %s: that reason alone', async (code, startsAt, endsAt) => {
    const res = await book(adult.cookie, { stationId: bench, startsAt, endsAt })
    expect(res.status).toBe(422)
    expect(res.body.data.reasons.map(r => r.code)).toEqual([code])
  })

  it('refuses a cure hold on anything but a laminating bench', async () => {
    const booth = (await makeStation({ clubId, kind: 'sanding_booth' })).stationId
    const res = await book(adult.cookie, { stationId: booth, startsAt: `${clubDay(4)}T10:00`, endsAt: `${clubDay(4)}T11:00`, cureHoldHours: 12 })
    expect(res.body.data.reasons.map(r => r.code)).toEqual(['CURE_HOLD_NOT_A_BENCH'])
  })

  it('answers 404 for another club\'s station and 400 for bad times and a cure hold over 7 days', async () => {
    const other = (await makeStation({})).stationId // the demo club's
    expect((await book(adult.cookie, { stationId: other, startsAt: `${clubDay(3)}T10:00`, endsAt: `${clubDay(3)}T11:00` })).status).toBe(404)
    expect((await book(adult.cookie, { stationId: bench, startsAt: `${clubDay(3)} 10:00`, endsAt: `${clubDay(3)}T11:00` })).status).toBe(400)
    expect((await book(adult.cookie, { stationId: bench, startsAt: `${clubDay(3)}T10:00`, endsAt: `${clubDay(3)}T11:00`, cureHoldHours: 169 })).status).toBe(400)
  })

  it('books a current adult within the rules: 201, and the confirmation e-mail is queued', async () => {
    const before = (await noticesOf(adult.memberId)).length
    const res = await book(adult.cookie, { stationId: bench, startsAt: `${clubDay(6)}T09:00`, endsAt: `${clubDay(6)}T10:00`, note: 'Fin layup' })
    expect(res.status).toBe(201)
    expect(res.body.booking).toMatchObject({ startsLocal: `${clubDay(6)}T09:00`, endsLocal: `${clubDay(6)}T10:00`, mine: true, note: 'Fin layup' })
    const kinds = await sql<{ kind: string }>('SELECT kind FROM notices WHERE membership_id = $1 ORDER BY created_at', [adult.memberId])
    expect(kinds.length).toBe(before + 1)
    expect(kinds.at(-1)!.kind).toBe('booking_confirmed')
  })
})

describe('no two live bookings of one station overlap', () => {
  let clubId: string
  let trainer: MadeMember
  let station: string
  let a: SignedIn
  let b: SignedIn

  beforeAll(async () => {
    ({ clubId, trainer } = await bookingClub())
    station = (await makeStation({ clubId, openingHours: openEveryDay('08:00', '22:00') })).stationId
    a = await member(clubId, trainer.memberId)
    b = await member(clubId, trainer.memberId)
  })

  it('50 simultaneous requests for one slot: exactly one 201, 49 × 409 with that slot, one row', async () => {
    const slot = { stationId: station, startsAt: `${clubDay(9)}T10:00`, endsAt: `${clubDay(9)}T12:00` }
    const results = await Promise.all(Array.from({ length: 50 }, (_, i) => book(i % 2 ? a.cookie : b.cookie, slot)))
    const statuses = results.map(r => r.status)
    expect(statuses.filter(s => s === 201).length).toBe(1)
    expect(statuses.filter(s => s === 409).length).toBe(49)
    const won = results.find(r => r.status === 201)!.body.booking
    for (const lost of results.filter(r => r.status === 409)) {
      expect(lost.body.data.conflict).toEqual({ stationId: station, startsAt: won.startsAt, endsAt: won.endsAt })
    }
    const rows = await sql('SELECT 1 FROM bookings WHERE station_id = $1 AND starts_at < $3 AND ends_at > $2', [station, won.startsAt, won.endsAt])
    expect(rows.length).toBe(1)
  })

  it('back to back fits (half-open ranges); an overlap is 409 naming the slot it hits; a cancelled booking frees its slot', async () => {
    const day = clubDay(10)
    const first = await book(a.cookie, { stationId: station, startsAt: `${day}T10:00`, endsAt: `${day}T11:00` })
    const second = await book(b.cookie, { stationId: station, startsAt: `${day}T11:00`, endsAt: `${day}T12:00` })
    expect([first.status, second.status]).toEqual([201, 201])
    const clash = await book(b.cookie, { stationId: station, startsAt: `${day}T10:30`, endsAt: `${day}T10:45` })
    expect(clash.status).toBe(409)
    expect(clash.body.data.conflict).toEqual({ stationId: station, startsAt: first.body.booking.startsAt, endsAt: first.body.booking.endsAt })
    expect((await api(`/api/bookings/${first.body.booking.id}/cancel`, { method: 'POST', as: a.cookie, body: {} })).status).toBe(200)
    expect((await book(b.cookie, { stationId: station, startsAt: `${day}T10:30`, endsAt: `${day}T10:45` })).status).toBe(201)
  })

  it('the week view shows the slot to every member, the booker\'s name only to them', async () => {
    const day = clubDay(11)
    const made = await book(a.cookie, { stationId: station, startsAt: `${day}T14:00`, endsAt: `${day}T15:30`, note: 'Nose cone' })
    const mine = await api<BookingWeekDto>('/api/bookings', { as: a.cookie, query: { week: day, stationId: station } })
    const theirs = await api<BookingWeekDto>('/api/bookings', { as: b.cookie, query: { week: day } })
    expect(mine.body.days).toHaveLength(7)
    expect(mine.body.days).toContain(day)
    expect(mine.body.bookings.find(x => x.id === made.body.booking.id)).toMatchObject({ mine: true, member: { id: a.memberId }, note: 'Nose cone' })
    expect(theirs.body.bookings.find(x => x.id === made.body.booking.id)).toMatchObject({ mine: false, member: null, note: '' })
    const list = await api<BookingDto[]>('/api/bookings/mine', { as: a.cookie })
    expect(list.body.map(x => x.id)).toContain(made.body.booking.id)
    expect((await api('/api/bookings', { as: a.cookie, query: { week: 'last week' } })).status).toBe(400)
  })
})

describe('a booking across a daylight-saving change (Europe/London, clocks back at 02:00 BST on 27 October 2030)', () => {
  let station: string
  let m: SignedIn

  beforeAll(async () => {
    const { clubId, trainer } = await bookingClub()
    station = (await makeStation({ clubId, openingHours: openEveryDay() })).stationId
    m = await member(clubId, trainer.memberId)
  })

  it('stores 09:00–13:00 on the day of the change as 09:00Z–13:00Z (GMT), and the day before as 08:00Z–12:00Z (BST)', async () => {
    const onDay = await book(m.cookie, { stationId: station, startsAt: '2030-10-27T09:00', endsAt: '2030-10-27T13:00' })
    const dayBefore = await book(m.cookie, { stationId: station, startsAt: '2030-10-26T09:00', endsAt: '2030-10-26T13:00' })
    expect(onDay.status).toBe(201)
    expect([onDay.body.booking.startsAt, onDay.body.booking.endsAt]).toEqual(['2030-10-27T09:00:00.000Z', '2030-10-27T13:00:00.000Z'])
    expect([dayBefore.body.booking.startsAt, dayBefore.body.booking.endsAt]).toEqual(['2030-10-26T08:00:00.000Z', '2030-10-26T12:00:00.000Z'])
    const [row] = await sql<{ s: string, e: string }>(`SELECT to_char(starts_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI') AS s, to_char(ends_at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI') AS e FROM bookings WHERE id = $1`, [onDay.body.booking.id])
    expect(row).toEqual({ s: '2030-10-27T09:00', e: '2030-10-27T13:00' })
  })

  it('a booking from 00:30 to 03:00 spans the change: 23:30Z to 03:00Z, three and a half hours, within a 4-hour limit', async () => {
    const res = await book(m.cookie, { stationId: station, startsAt: '2030-10-27T00:30', endsAt: '2030-10-27T03:00' })
    expect(res.status).toBe(201)
    expect([res.body.booking.startsAt, res.body.booking.endsAt]).toEqual(['2030-10-26T23:30:00.000Z', '2030-10-27T03:00:00.000Z'])
    expect([res.body.booking.startsLocal, res.body.booking.endsLocal]).toEqual(['2030-10-27T00:30', '2030-10-27T03:00'])
    // 00:00–04:00 on that day is five real hours: over the 4-hour limit although the wall clock says four.
    const long = await book(m.cookie, { stationId: station, startsAt: '2030-10-28T00:00', endsAt: '2030-10-28T04:00' })
    expect(long.status).toBe(201)
    const changeDay = await book(m.cookie, { stationId: station, startsAt: '2031-10-26T00:00', endsAt: '2031-10-26T04:00' })
    expect(changeDay.body.data.reasons.map(r => r.code)).toEqual(['TOO_LONG'])
  })
})

describe('cancellation rights', () => {
  let clubId: string
  let trainer: MadeMember
  let station: string
  let owner: SignedIn
  let other: SignedIn
  let officer: SignedIn

  beforeAll(async () => {
    ({ clubId, trainer } = await bookingClub())
    station = (await makeStation({ clubId })).stationId
    owner = await member(clubId, trainer.memberId)
    other = await member(clubId, trainer.memberId)
    officer = await member(clubId, trainer.memberId, [], { roles: ['safety_officer'] })
  })

  const cancel = (id: string, cookie: string, body: Record<string, unknown> = {}) =>
    api<BookingDto & { data: { reasons: { code: string }[] } }>(`/api/bookings/${id}/cancel`, { method: 'POST', as: cookie, body })

  it('the member cancels their own before it starts (e-mailed); another member gets 404; twice is 422', async () => {
    const made = await book(owner.cookie, { stationId: station, startsAt: `${clubDay(4)}T10:00`, endsAt: `${clubDay(4)}T11:00` })
    expect((await cancel(made.body.booking.id, other.cookie)).status).toBe(404)
    const res = await cancel(made.body.booking.id, owner.cookie)
    expect(res.status).toBe(200)
    expect(res.body.cancelledAt).not.toBeNull()
    const kinds = await sql<{ kind: string }>('SELECT kind FROM notices WHERE membership_id = $1 AND subject_key = $2 ORDER BY created_at', [owner.memberId, made.body.booking.id])
    expect(kinds.map(k => k.kind)).toEqual(['booking_confirmed', 'booking_cancelled'])
    expect((await cancel(made.body.booking.id, owner.cookie)).body.data.reasons.map(r => r.code)).toEqual(['ALREADY_CANCELLED'])
  })

  it('not once it has started', async () => {
    const { bookingId } = await makeBooking({ stationId: station, memberId: owner.memberId, startsAt: ago('30 minutes'), endsAt: fromNow('30 minutes') })
    const res = await cancel(bookingId, owner.cookie)
    expect(res.status).toBe(422)
    expect(res.body.data.reasons.map(r => r.code)).toEqual(['BOOKING_STARTED'])
  })

  it('an officer cancels anyone\'s, started or not, only with a reason, audited, and the member is e-mailed', async () => {
    const elsewhere = (await makeStation({ clubId })).stationId
    const { bookingId } = await makeBooking({ stationId: elsewhere, memberId: owner.memberId, startsAt: ago('10 minutes'), endsAt: fromNow('2 hours') })
    const noReason = await cancel(bookingId, officer.cookie)
    expect(noReason.body.data.reasons.map(r => r.code)).toEqual(['REASON_REQUIRED'])
    const res = await cancel(bookingId, officer.cookie, { reason: 'Extraction fan out of order' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ cancelReason: 'Extraction fan out of order', member: { id: owner.memberId } })
    const audit = await sql<{ action: string, reason: string, actor_membership_id: string }>(
      'SELECT action, reason, actor_membership_id FROM audit_events WHERE subject_id = $1', [bookingId])
    expect(audit).toEqual([{ action: 'booking.cancel', reason: 'Extraction fan out of order', actor_membership_id: officer.memberId }])
    const kinds = await sql<{ kind: string }>('SELECT kind FROM notices WHERE membership_id = $1 AND subject_key = $2', [owner.memberId, bookingId])
    expect(kinds.map(k => k.kind)).toEqual(['booking_cancelled'])
  })

  it('refuses a reason longer than 500 characters (400)', async () => {
    expect((await cancel(owner.memberId, owner.cookie, { reason: 'x'.repeat(501) })).status).toBe(400)
  })
})
