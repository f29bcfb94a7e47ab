import { describe, expect, it, afterAll } from 'vitest'
import { createPage } from '@nuxt/test-utils/e2e'
import { setupBrowser, goTo, signedInPage } from '../support/browser'
import { api } from '../support/http'
import { sql } from '../support/db'
import { DEMO } from '../support/test-env'
import { demoClubId, fromNow, makeEnrolment, makeLaunchEvent, makeMember, makeTrainingSession, clubDay } from '../support/factories'
import { formatMoney } from '../../shared/utils/dues-renewal'
import type { FrontDoorSettingsDto } from '../../shared/types/clubs'

await setupBrowser()

// The demo club's front-door settings as they were, put back at the end (other files read the club).
const before = (await api<FrontDoorSettingsDto>('/api/front-door/settings', { as: 'admin' })).body
afterAll(async () => {
  await api('/api/front-door/settings', { method: 'PUT', as: 'admin', body: before })
})

describe('the club\'s front door', () => {
  it('a visitor sees the club, its dues, the next session with spaces left and the next event; the admin edits it and the visitor sees the change', async () => {
    const clubId = await demoClubId()
    const [instructor] = await sql<{ id: string }>('SELECT m.id FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email = $1', [DEMO.instructor])
    const trainee = await makeMember({ name: 'Perpetua Gallowglass' })
    const { sessionId } = await makeTrainingSession({ instructorId: instructor!.id, clubId, startsAt: fromNow('20 minutes'), capacity: 4, place: 'Front-door test shed' })
    await makeEnrolment({ sessionId, memberId: trainee.memberId })
    await makeLaunchEvent({ createdBy: instructor!.id, heldOn: clubDay(1), site: 'Front-door test flats', registeredIds: [trainee.memberId] })
    // What the page must show first: the club's own next session and event, as the database has them.
    const [first] = await sql<{ place: string, left: number }>(`SELECT s.place, s.capacity - (SELECT count(*)::int FROM training_enrolments e
      WHERE e.session_id = s.id AND e.status = 'enrolled') AS left FROM training_sessions s
      WHERE s.club_id = $1 AND s.starts_at > now() AND s.issued_at IS NULL ORDER BY s.starts_at, s.id LIMIT 1`, [clubId])
    const [next] = await sql<{ site: string }>(`SELECT site FROM launch_events WHERE club_id = $1 AND held_on >= $2 AND cancelled_at IS NULL
      ORDER BY held_on, created_at, id LIMIT 1`, [clubId, clubDay(0)])
    const plans = await sql<{ name: string, price_minor: number, currency: string }>('SELECT name, price_minor, currency FROM dues_plans WHERE club_id = $1', [clubId])
    const [club] = await sql<{ name: string }>('SELECT name FROM clubs WHERE id = $1', [clubId])

    const visitor = await createPage(undefined, { viewport: { width: 375, height: 800 } })
    const admin = await signedInPage(DEMO.admin, DEMO.password)
    try {
      await goTo(visitor, '/')
      expect(new URL(visitor.url()).pathname).toBe('/')
      expect(await visitor.getByTestId('front-door-name').textContent()).toContain(club!.name)
      const dues = await visitor.getByTestId('front-door-dues').textContent()
      expect(plans.length).toBeGreaterThan(0)
      for (const p of plans) {
        expect(dues).toContain(p.name)
        expect(dues).toContain(formatMoney(p.price_minor, p.currency))
      }
      const session = visitor.getByTestId('front-door-session').first()
      expect(await session.textContent()).toContain(first!.place)
      expect(await session.getByTestId('front-door-spaces').textContent()).toContain(first!.left === 1 ? '1 space left' : `${first!.left} spaces left`)
      expect(await visitor.getByTestId('front-door-event').first().textContent()).toContain(next!.site)
      expect(await visitor.getByTestId('front-door-caution').textContent()).toMatch(/real energy/)
      const text = await visitor.locator('main').textContent()
      expect(text).not.toContain(trainee.name)
      const members = await sql<{ name: string }>(`SELECT u.name FROM users u JOIN memberships m ON m.user_id = u.id WHERE m.club_id = $1 LIMIT 500`, [clubId])
      for (const m of members) expect(text, m.name).not.toContain(m.name)

      // The admin finds the public page from the dashboard, edits the description and hides the events.
      await admin.getByTestId('edit-public-page').click()
      await admin.waitForURL(url => url.pathname === '/public-page')
      await admin.getByTestId('public-page-description').fill('We build water rockets from bottles and fly them on the marsh.')
      await admin.getByTestId('public-page-show-events').uncheck()
      await admin.getByTestId('public-page-save').click()
      await admin.getByText('Visitors see the change now').waitFor()

      await goTo(visitor, '/')
      expect(await visitor.getByTestId('front-door-description').textContent()).toContain('We build water rockets from bottles and fly them on the marsh.')
      expect(await visitor.getByTestId('front-door-events').count()).toBe(0)
      expect(await visitor.getByTestId('front-door-dues').count()).toBe(1)
    }
    finally {
      await visitor.close()
      await admin.close()
    }
  })

  it('the fill-pass check opens the pass\'s page from its pasted address', async () => {
    const pass = await api<{ verifyUrl: string }>('/api/me/fill-pass', { as: 'member' })
    const page = await createPage()
    try {
      await goTo(page, '/')
      await page.getByTestId('front-door-pass-input').fill('not a pass')
      await page.getByTestId('front-door-pass-check-submit').click()
      await page.getByRole('alert').filter({ hasText: 'Paste the whole address' }).waitFor()
      await page.getByTestId('front-door-pass-input').fill(pass.body.verifyUrl)
      await page.getByTestId('front-door-pass-check-submit').click()
      await page.waitForURL(url => url.pathname.startsWith('/verify/'))
      await page.getByTestId('verify-name').waitFor()
    }
    finally {
      await page.close()
    }
  })

  it('a signed-in member still gets the dashboard at /', async () => {
    const page = await signedInPage(DEMO.member, DEMO.password)
    try {
      await page.getByRole('heading', { name: /Hello/ }).waitFor()
      // Loaded afresh too: the server renders the dashboard for a session, not the public page.
      await goTo(page, '/')
      await page.getByRole('heading', { name: /Hello/ }).waitFor()
      expect(await page.getByTestId('front-door').count()).toBe(0)
    }
    finally {
      await page.close()
    }
  })
})
