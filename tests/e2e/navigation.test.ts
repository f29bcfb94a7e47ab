import { describe, expect, it } from 'vitest'
import { createPage } from '@nuxt/test-utils/e2e'
import { setupBrowser, goTo, submitSignIn } from '../support/browser'
import type { Page } from 'playwright-core'
import { DEMO, type DemoRole } from '../support/test-env'
import { makeMember } from '../support/factories'

await setupBrowser()

const ALL_ITEMS = ['nav-dashboard', 'nav-standing', 'nav-waiver', 'nav-vessels', 'nav-calculator', 'nav-coupons', 'nav-training', 'nav-workshop', 'nav-tiers', 'nav-events', 'nav-incidents', 'nav-members', 'nav-audit', 'nav-audit-desk', 'nav-outbox', 'nav-dues', 'nav-vessel-policy', 'nav-fill-stations']

async function visibleNavItems(page: Page): Promise<string[]> {
  const found: string[] = []
  for (const id of ALL_ITEMS) if (await page.getByTestId(id).isVisible()) found.push(id)
  return found
}

describe('navigation per role', () => {
  it.each<[DemoRole, string[]]>([
    ['member', ['nav-dashboard', 'nav-standing', 'nav-waiver', 'nav-vessels', 'nav-calculator', 'nav-coupons', 'nav-training', 'nav-workshop', 'nav-tiers', 'nav-events', 'nav-incidents']],
    ['instructor', ['nav-dashboard', 'nav-standing', 'nav-waiver', 'nav-vessels', 'nav-calculator', 'nav-coupons', 'nav-training', 'nav-workshop', 'nav-tiers', 'nav-events', 'nav-incidents', 'nav-members', 'nav-fill-stations']],
    ['safety', ['nav-dashboard', 'nav-standing', 'nav-waiver', 'nav-vessels', 'nav-calculator', 'nav-coupons', 'nav-training', 'nav-workshop', 'nav-tiers', 'nav-events', 'nav-incidents', 'nav-members', 'nav-audit', 'nav-audit-desk', 'nav-vessel-policy', 'nav-fill-stations']],
    ['admin', ['nav-dashboard', 'nav-standing', 'nav-waiver', 'nav-vessels', 'nav-calculator', 'nav-coupons', 'nav-training', 'nav-workshop', 'nav-tiers', 'nav-events', 'nav-incidents', 'nav-members', 'nav-audit', 'nav-audit-desk', 'nav-outbox', 'nav-dues', 'nav-fill-stations']],
  ])('the demo %s account signs in through the form and sees exactly its navigation', async (role, expected) => {
    const page = await createPage('/login')
    try {
      await submitSignIn(page, DEMO[role], DEMO.password)
      await page.waitForURL(url => url.pathname === '/')
      await page.getByTestId('attention').waitFor()
      expect(await visibleNavItems(page)).toEqual(expected)
      expect(await page.getByTestId('nav-profile').textContent()).toMatch(/\w+ \w+/)
    }
    finally {
      await page.close()
    }
  })
})

describe('turning away and signing out', () => {
  it('turns a member who types /members in the address bar back to the dashboard with a notice', async () => {
    const page = await createPage('/login')
    try {
      await submitSignIn(page, DEMO.member, DEMO.password)
      await page.waitForURL(url => url.pathname === '/')
      await goTo(page, '/members')
      expect(new URL(page.url()).pathname).toBe('/')
      const notice = page.getByTestId('denied-notice')
      await notice.waitFor()
      expect(await notice.textContent()).toContain('/members')
      expect(await notice.textContent()).toMatch(/not available for your role/)
      await page.getByTestId('denied-dismiss').click()
      await notice.waitFor({ state: 'detached' })
    }
    finally {
      await page.close()
    }
  })

  it('shows an error on the form for a wrong password and stays on the sign-in page', async () => {
    const someone = await makeMember()
    const page = await createPage('/login')
    try {
      await submitSignIn(page, someone.email, 'not-the-password')
      const error = page.getByTestId('form-error')
      await error.waitFor()
      expect(await error.textContent()).toMatch(/wrong/i)
      expect(new URL(page.url()).pathname).toBe('/login')
    }
    finally {
      await page.close()
    }
  })

  it('signs out: back on the sign-in page, and the dashboard asks for sign-in again', async () => {
    const page = await createPage('/login')
    try {
      await submitSignIn(page, DEMO.instructor, DEMO.password)
      await page.waitForURL(url => url.pathname === '/')
      await page.getByTestId('sign-out').click()
      await page.waitForURL(url => url.pathname === '/login')
      await goTo(page, '/standing')
      expect(new URL(page.url()).pathname).toBe('/login')
      expect(new URL(page.url()).searchParams.get('next')).toBe('/standing')
    }
    finally {
      await page.close()
    }
  })
})

describe('on a phone (360 × 740)', () => {
  it('hides the navigation behind the menu button, which opens it', async () => {
    const page = await createPage('/login', { viewport: { width: 360, height: 740 } })
    try {
      await submitSignIn(page, DEMO.safety, DEMO.password)
      await page.waitForURL(url => url.pathname === '/')
      await page.getByTestId('attention').waitFor()
      expect(await page.getByTestId('main-nav').isVisible()).toBe(false)
      const toggle = page.getByTestId('nav-toggle')
      expect(await toggle.getAttribute('aria-expanded')).toBe('false')
      await toggle.click()
      expect(await toggle.getAttribute('aria-expanded')).toBe('true')
      await page.getByTestId('nav-standing').waitFor()
      expect(await visibleNavItems(page)).toEqual(['nav-dashboard', 'nav-standing', 'nav-waiver', 'nav-vessels', 'nav-calculator', 'nav-coupons', 'nav-training', 'nav-workshop', 'nav-tiers', 'nav-events', 'nav-incidents', 'nav-members', 'nav-audit', 'nav-audit-desk', 'nav-vessel-policy', 'nav-fill-stations'])
      await page.getByTestId('nav-standing').click()
      await page.waitForURL(url => url.pathname === '/standing')
      expect(await page.getByTestId('main-nav').isVisible()).toBe(false)
      // Nothing spills sideways on a narrow screen.
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(360)
    }
    finally {
      await page.close()
    }
  })
})
