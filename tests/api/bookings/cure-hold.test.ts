import { beforeAll, describe, expect, it } from 'vitest'
import { sql } from '../../support/db'
import { clubDay, makeStation, openEveryDay } from '../../support/factories'
import { book, bookingClub, member, type SignedIn } from './support'

// A laminating booking may ask for a cure hold: from the bench booking's end, on the first free
// cure-rack slot, ignoring opening hours; both rows in one transaction or neither.
describe('cure holds', () => {
  let clubId: string
  let m: SignedIn
  let benchA: string
  let benchB: string
  let slots: string[]
  const count = async (stationId: string) => (await sql<{ n: number }>('SELECT count(*)::int AS n FROM bookings WHERE station_id = $1', [stationId]))[0]!.n

  beforeAll(async () => {
    const made = await bookingClub()
    clubId = made.clubId
    m = await member(clubId, made.trainer.memberId, ['composite_ppe'])
    benchA = (await makeStation({ clubId, name: 'Bench A', requiredCourses: ['composite_ppe'], openingHours: openEveryDay('09:00', '21:00') })).stationId
    benchB = (await makeStation({ clubId, name: 'Bench B', requiredCourses: ['composite_ppe'], openingHours: openEveryDay('09:00', '21:00') })).stationId
    // The cure rack is "open" only by day here: a hold runs through the night all the same.
    slots = [
      (await makeStation({ clubId, name: 'Cure slot 1', kind: 'cure_rack_slot', position: 1, maxBookingMinutes: 60, openingHours: openEveryDay('09:00', '17:00') })).stationId,
      (await makeStation({ clubId, name: 'Cure slot 2', kind: 'cure_rack_slot', position: 2, maxBookingMinutes: 60, openingHours: openEveryDay('09:00', '17:00') })).stationId,
    ]
  })

  it('takes the first free slot from the end of the bench booking, the next one when it is held, and 409 with nothing booked when none is free', async () => {
    const day = clubDay(20)
    const first = await book(m.cookie, { stationId: benchA, startsAt: `${day}T17:00`, endsAt: `${day}T20:00`, cureHoldHours: 24 })
    expect(first.status).toBe(201)
    expect(first.body.cureHold).toMatchObject({ station: { id: slots[0] }, startsAt: first.body.booking.endsAt, cureForBookingId: first.body.booking.id })
    expect(Date.parse(first.body.cureHold!.endsAt) - Date.parse(first.body.booking.endsAt)).toBe(24 * 3_600_000)
    const second = await book(m.cookie, { stationId: benchB, startsAt: `${day}T18:00`, endsAt: `${day}T20:00`, cureHoldHours: 24 })
    expect(second.status).toBe(201)
    expect(second.body.cureHold!.station.id).toBe(slots[1])
    const benchBefore = await count(benchA)
    const third = await book(m.cookie, { stationId: benchA, startsAt: `${clubDay(21)}T09:00`, endsAt: `${clubDay(21)}T10:00`, cureHoldHours: 6 })
    expect(third.status).toBe(409)
    expect(third.body.message).toMatch(/No cure-rack slot is free/)
    expect(await count(benchA)).toBe(benchBefore)
  })

  it('two laminators asking at the same moment get one slot each', async () => {
    const day = clubDay(30)
    const [x, y] = await Promise.all([
      book(m.cookie, { stationId: benchA, startsAt: `${day}T10:00`, endsAt: `${day}T12:00`, cureHoldHours: 48 }),
      book(m.cookie, { stationId: benchB, startsAt: `${day}T10:00`, endsAt: `${day}T12:00`, cureHoldHours: 48 }),
    ])
    expect([x!.status, y!.status]).toEqual([201, 201])
    expect(new Set([x!.body.cureHold!.station.id, y!.body.cureHold!.station.id])).toEqual(new Set(slots))
  })

  it('a hold that fails for any other reason leaves no bench booking either (one transaction)', async () => {
    const day = clubDay(40)
    // Forced failure: for this test only, the database refuses every row on this club's cure slots.
    const name = `test_refuse_cure_${clubId.slice(0, 8)}`
    await sql(`ALTER TABLE bookings ADD CONSTRAINT ${name} CHECK (station_id NOT IN ('${slots[0]}', '${slots[1]}')) NOT VALID`)
    try {
      const before = await count(benchA)
      const res = await book(m.cookie, { stationId: benchA, startsAt: `${day}T10:00`, endsAt: `${day}T12:00`, cureHoldHours: 24 })
      expect(res.status).toBe(422)
      expect(await count(benchA)).toBe(before)
      const withoutHold = await book(m.cookie, { stationId: benchA, startsAt: `${day}T10:00`, endsAt: `${day}T12:00` })
      expect(withoutHold.status).toBe(201)
    }
    finally {
      await sql(`ALTER TABLE bookings DROP CONSTRAINT ${name}`)
    }
  })
})
