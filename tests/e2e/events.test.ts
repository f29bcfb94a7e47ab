import { describe, expect, it } from 'vitest'
import { setupBrowser, goTo, signedInPage } from '../support/browser'
import { sql } from '../support/db'
import { clubDay, makeFillStation, makeMember } from '../support/factories'

await setupBrowser()

describe('launch events', () => {
  it('an officer creates an event with a fill station and staff; a member registers for it', async () => {
    const officer = await makeMember({ roles: ['safety_officer'] })
    const instructor = await makeMember({ roles: ['instructor'] })
    const member = await makeMember()
    const { stationId, name: stationName } = await makeFillStation({ lowestPartRatingBar: 60 })
    const site = `Journey flat ${stationId.slice(0, 6)}`

    const page = await signedInPage(officer.email, officer.password)
    let eventId = ''
    try {
      await goTo(page, '/events')
      await page.getByTestId('event-new').click()
      await page.waitForURL(url => url.pathname === '/events/new')
      await page.getByTestId(`event-station-${stationId}`).waitFor()
      await page.getByTestId('event-day').fill(clubDay(12))
      await page.getByTestId('event-site').fill(site)
      await page.getByTestId('event-cap').fill('12')
      await page.getByTestId(`event-station-${stationId}`).check()
      await page.getByTestId(`event-staff-${instructor.memberId}`).check()
      await page.getByTestId('event-save').click()
      await page.waitForURL(url => /^\/events\/[0-9a-f-]{36}$/.test(url.pathname))
      eventId = new URL(page.url()).pathname.split('/')[2]!
      expect(await page.getByTestId('event-title').textContent()).toContain(site)
      expect(await page.getByTestId('event-staff').textContent()).toContain(instructor.name)
      // 60 bar ÷ the starting equipment factor 3 = 20 bar at the station.
      expect(await page.getByTestId('event-stations').textContent()).toMatch(new RegExp(`${stationName}: launches at most at 20.00 bar`))
    }
    finally {
      await page.close()
    }

    const memberPage = await signedInPage(member.email, member.password)
    try {
      await goTo(memberPage, '/events')
      await memberPage.getByRole('link', { name: new RegExp(site) }).click()
      await memberPage.waitForURL(url => url.pathname === `/events/${eventId}`)
      await memberPage.getByTestId('event-register').click()
      await memberPage.getByTestId('event-you-registered').waitFor()
      expect(await memberPage.getByTestId('event-registered-count').textContent()).toContain('1')
      expect(await memberPage.getByTestId('event-withdraw').isVisible()).toBe(true)
      // A member sees neither the fill log nor the roster link.
      expect(await memberPage.getByTestId('event-roster-link').count()).toBe(0)
    }
    finally {
      await memberPage.close()
    }
    expect(await sql('SELECT 1 FROM launch_event_registrations WHERE event_id = $1 AND membership_id = $2 AND withdrawn_at IS NULL', [eventId, member.memberId])).toHaveLength(1)
  })
})
