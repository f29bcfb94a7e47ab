import { describe, expect, it } from 'vitest'
import { setupBrowser, goTo, signedInPage } from '../support/browser'
import { sql } from '../support/db'
import { clubDay, makeMember, makeTrainingRecord } from '../support/factories'
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
})
