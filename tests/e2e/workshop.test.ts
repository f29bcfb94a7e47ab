import { describe, expect, it } from 'vitest'
import { setupBrowser, goTo, signedInPage } from '../support/browser'
import { sql } from '../support/db'
import { clubDay, makeBooking, makeMember, makeStation, makeTrainingRecord } from '../support/factories'
import { DEMO } from '../support/test-env'

await setupBrowser()

async function benchA(): Promise<string> {
  const [row] = await sql<{ id: string }>(`SELECT s.id FROM stations s JOIN clubs c ON c.id = s.club_id WHERE s.name = 'Laminating bench A' ORDER BY c.created_at LIMIT 1`)
  return row!.id
}

async function demoInstructorId(): Promise<string> {
  const [row] = await sql<{ id: string }>('SELECT m.id FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email = $1', [DEMO.instructor])
  return row!.id
}

describe('the workshop calendar', () => {
  it('a member current in composite handling books Laminating bench A and sees it in the week view; on a 360 px phone', async () => {
    const member = await makeMember()
    await makeTrainingRecord({ memberId: member.memberId, course: 'composite_ppe', trainerId: await demoInstructorId() })
    const page = await signedInPage(member.email, member.password)
    await page.setViewportSize({ width: 360, height: 740 })
    try {
      const day = clubDay(3)
      await goTo(page, `/workshop/${await benchA()}?week=${day}`)
      expect(await page.getByTestId('station-name').textContent()).toContain('Laminating bench A')
      expect(await page.getByTestId('booking-cautions').textContent()).toMatch(/sensitise skin.*gloves and eye protection.*ventilation/s)
      await page.getByTestId('field-date').fill(day)
      await page.getByTestId('field-from').fill('09:00')
      await page.getByTestId('field-to').fill('10:30')
      await page.getByTestId('booking-submit').click()
      expect(await page.getByTestId('form-ok').textContent()).toMatch(/Booked: Laminating bench A/)
      const cell = page.getByTestId(`week-day-${day}`)
      await cell.getByText('Your booking').waitFor()
      expect(await cell.textContent()).toMatch(/09:00–10:30/)
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(360)

      await goTo(page, '/workshop/mine')
      expect(await page.getByTestId('my-booking').first().textContent()).toMatch(/Laminating bench A/)
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(360)
    }
    finally {
      await page.close()
    }
  })

  it('a member without the course is refused, with the reason shown', async () => {
    const member = await makeMember()
    const page = await signedInPage(member.email, member.password)
    try {
      await goTo(page, '/workshop')
      await page.getByTestId('field-stationId').selectOption({ label: 'Laminating bench A' })
      await page.getByTestId('field-date').fill(clubDay(5))
      await page.getByTestId('field-from').fill('10:00')
      await page.getByTestId('field-to').fill('11:00')
      await page.getByTestId('booking-submit').click()
      expect(await page.getByTestId('form-error').textContent()).toMatch(/Composite handling and PPE: never taken/)
      expect(await sql('SELECT 1 FROM bookings WHERE membership_id = $1', [member.memberId])).toHaveLength(0)
    }
    finally {
      await page.close()
    }
  })

  it('the safety officer shortens a station\'s longest booking; a member\'s longer booking is then refused with that reason', async () => {
    const { stationId, name } = await makeStation({ maxBookingMinutes: 240 })
    const officer = await signedInPage(DEMO.safety, DEMO.password)
    try {
      await goTo(officer, '/workshop')
      await officer.getByTestId('station-settings-link').click()
      await officer.waitForURL(url => url.pathname === '/workshop/stations')
      await officer.getByTestId(`station-edit-${name}`).click()
      await officer.getByTestId('station-field-max').fill('60')
      await officer.getByTestId(`station-${stationId}-save`).click()
      expect(await officer.getByTestId('form-ok').textContent()).toContain(`Saved: ${name}`)
      await officer.getByTestId(`station-row-${name}`).getByText('at most 60 minutes').waitFor()
    }
    finally {
      await officer.close()
    }
    expect((await sql<{ m: number }>('SELECT max_booking_minutes AS m FROM stations WHERE id = $1', [stationId]))[0]!.m).toBe(60)

    const member = await makeMember()
    const page = await signedInPage(member.email, member.password)
    try {
      await goTo(page, `/workshop/${stationId}`)
      await page.getByTestId('field-date').fill(clubDay(4))
      await page.getByTestId('field-from').fill('10:00')
      await page.getByTestId('field-to').fill('12:00')
      await page.getByTestId('booking-submit').click()
      expect(await page.getByTestId('form-error').textContent()).toMatch(/Too long: this station is booked for at most 1 hour at a time/)
      expect(await sql('SELECT 1 FROM bookings WHERE membership_id = $1', [member.memberId])).toHaveLength(0)
    }
    finally {
      await page.close()
    }
  })

  it('the safety officer cancels a member\'s booking with a reason, after confirming; the member sees it cancelled', async () => {
    const { stationId } = await makeStation()
    const member = await makeMember()
    const startsAt = new Date(Date.now() + 3 * 86_400_000)
    const { bookingId } = await makeBooking({ stationId, memberId: member.memberId, startsAt, endsAt: new Date(startsAt.getTime() + 3_600_000) })
    const [{ day }] = await sql<{ day: string }>(
      'SELECT (b.starts_at AT TIME ZONE c.time_zone)::date::text AS day FROM bookings b JOIN clubs c ON c.id = b.club_id WHERE b.id = $1', [bookingId]) as [{ day: string }]
    const officer = await signedInPage(DEMO.safety, DEMO.password)
    try {
      await goTo(officer, `/workshop/${stationId}?week=${day}`)
      const cell = officer.getByTestId(`week-day-${day}`)
      expect(await cell.textContent()).toContain(member.name)
      await cell.getByTestId('week-booking-cancel').click()
      // The reason is required: nothing is sent without it.
      await officer.getByTestId('booking-cancel-submit').click()
      await officer.getByTestId('error-reason').waitFor()
      await officer.getByTestId('booking-cancel-reason').fill('The bench is closed for a resin spill clean-up.')
      await officer.getByTestId('booking-cancel-submit').click()
      await officer.getByTestId('booking-cancel-confirm').waitFor()
      expect((await sql<{ c: string | null }>('SELECT cancelled_at::text AS c FROM bookings WHERE id = $1', [bookingId]))[0]!.c).toBeNull()
      await officer.getByTestId('booking-cancel-confirm').click()
      expect(await officer.getByTestId('form-ok').textContent()).toMatch(/Cancelled:/)
      await expect.poll(() => cell.textContent()).not.toContain(member.name)
    }
    finally {
      await officer.close()
    }
    const [row] = await sql<{ c: string | null, r: string | null }>('SELECT cancelled_at::text AS c, cancel_reason AS r FROM bookings WHERE id = $1', [bookingId])
    expect(row!.c).not.toBeNull()
    expect(row!.r).toBe('The bench is closed for a resin spill clean-up.')

    const page = await signedInPage(member.email, member.password)
    try {
      await goTo(page, '/workshop/mine')
      expect(await page.textContent('body')).toContain('— cancelled: The bench is closed for a resin spill clean-up.')
    }
    finally {
      await page.close()
    }
  })
})
