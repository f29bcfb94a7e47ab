import { randomUUID } from 'node:crypto'
import { describe, it, expect } from 'vitest'
import { createPage } from '@nuxt/test-utils/e2e'
import { setupBrowser } from '../support/browser'
import { linkIn, waitForMail } from '../support/mail'
import { sql } from '../support/db'
import { clubDay } from '../support/factories'

await setupBrowser()

describe('joining the club in the browser', () => {
  it('signs up, confirms the e-mail from the link and lands signed in with a pending membership', async () => {
    const email = `browser-${randomUUID().slice(0, 8)}@test.hoopwise.example`
    const page = await createPage('/signup')
    await page.getByTestId('field-name').fill('Isla Mudflat')
    await page.getByTestId('field-email').fill(email)
    await page.getByTestId('field-password').fill('a-long-password-2')
    await page.getByTestId('field-birthDate').fill(clubDay(-25 * 365))
    expect(await page.getByTestId('guardian-fields').count()).toBe(0)
    await page.getByTestId('signup-submit').click()

    const done = page.getByTestId('signup-done')
    await done.waitFor()
    expect(await done.textContent()).toContain(email)

    const link = linkIn(await waitForMail(email, /^Confirm your e-mail/), '/verify-email')
    await page.goto(link.toString(), { waitUntil: 'hydration' })
    const verified = page.getByTestId('verify-done')
    await verified.waitFor()
    expect(await verified.textContent()).toContain(email)

    // Signed in as the new member: the session (read in the page) and the dashboard name them.
    const session = await page.evaluate(() => fetch('/api/_auth/session').then(r => r.json()))
    expect(session.user).toMatchObject({ email, name: 'Isla Mudflat', roles: ['member'] })
    await page.getByTestId('verify-continue').click()
    await page.waitForURL(url => url.pathname === '/')
    await page.getByTestId('nav-profile').getByText('Isla Mudflat').waitFor()

    const [row] = await sql<{ approved_at: Date | null, paid_through: string | null, email_verified_at: Date | null }>(`
      SELECT m.approved_at, m.paid_through, u.email_verified_at FROM memberships m JOIN users u ON u.id = m.user_id WHERE u.email = $1`, [email])
    expect(row).toMatchObject({ approved_at: null, paid_through: null })
    expect(row!.email_verified_at).not.toBeNull()

    // Opening the same link again, signed in and confirmed, says there is nothing left to do …
    await page.goto(link.toString(), { waitUntil: 'hydration' })
    await expect.poll(() => page.getByTestId('verify-already').textContent()).toContain('already confirmed')
    expect(await page.getByTestId('verify-resend').count()).toBe(0)
    await page.close()

    // … and signed out, that the link has been used.
    const stranger = await createPage()
    await stranger.goto(link.toString(), { waitUntil: 'hydration' })
    await stranger.locator('[data-testid="link-problem"][data-state="TOKEN_USED"]').waitFor()
    await stranger.close()
  })

  it('asks a junior for a guardian and shows their fields beside the form', async () => {
    const page = await createPage('/signup')
    await page.getByTestId('field-birthDate').fill(clubDay(-12 * 365))
    await page.getByTestId('guardian-fields').waitFor()
    await page.getByTestId('field-name').fill('Tam Mudflat')
    await page.getByTestId('field-email').fill(`junior-${randomUUID().slice(0, 8)}@test.hoopwise.example`)
    await page.getByTestId('field-password').fill('a-long-password-3')
    await page.getByTestId('signup-submit').click()
    await page.getByTestId('error-guardianName').waitFor()
    expect(await page.getByTestId('error-guardianEmail').textContent()).toContain('guardian')
    await page.close()
  })
})
