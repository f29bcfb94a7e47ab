import { describe, expect, it } from 'vitest'
import { createPage } from '@nuxt/test-utils/e2e'
import type { Page } from 'playwright-core'
import { setupBrowser, goTo, signedInPage } from '../support/browser'
import { DEMO } from '../support/test-env'

await setupBrowser()

/** The number in a figure's text: "2,725 J" → 2725. */
async function figure(page: Page, testId: string): Promise<number> {
  const text = await page.getByTestId(testId).textContent() ?? ''
  return Number(text.replace(/,/g, '').match(/-?\d+(\.\d+)?/)?.[0])
}

/** |actual − expected| ≤ relative × |expected|. */
function expectWithin(actual: number, expected: number, relative: number) {
  expect(Math.abs(actual - expected), `${actual} is not within ${relative * 100} % of ${expected}`).toBeLessThanOrEqual(Math.abs(expected) * relative)
}

// ASME PCC-2's worked values hold to ±0.2 %; the page rounds the TNT equivalent to 3 significant figures (±0.1 % more).
const PCC2_TOLERANCE = 0.002

describe('the public air-charge calculator', () => {
  it('shows the held values as you type, without signing in, on a phone 375 px wide (ASME PCC-2 (2008) Mandatory App. II and III)', async () => {
    const page = await createPage(undefined, { viewport: { width: 375, height: 800 } })
    try {
      await goTo(page, '/login')
      await page.getByTestId('auth-calculator').click()
      await page.waitForURL(url => url.pathname === '/calculator')
      await page.getByTestId('calc-empty').waitFor()
      expect(await page.getByTestId('calc-cautions').textContent()).toMatch(/full of water.*distance.*barrier/s)
      expect(await page.getByTestId('calc-cautions').textContent()).toMatch(/not a safety clearance/)

      // 2.0 L of air at 10 bar gauge: E 2725 J, TNT 6.386e-4 kg, minimum distance 30 m (App. III floor).
      await page.getByLabel('Gauge pressure').pressSequentially('10')
      await page.getByLabel('Vessel volume (L)').pressSequentially('3')
      await page.getByLabel('Water (L)').pressSequentially('1')
      await expect.poll(() => figure(page, 'calc-energy')).toBeCloseTo(2725, -1)
      expect(await figure(page, 'calc-air')).toBe(2)
      expectWithin(await figure(page, 'calc-energy'), 2725, PCC2_TOLERANCE) // ASME PCC-2 App. II, k = 1.4 form
      expectWithin(await figure(page, 'calc-tnt') / 1000, 6.386e-4, PCC2_TOLERANCE) // shown in grams; App. II, E / 4 266 920
      expect(await figure(page, 'calc-distance')).toBe(30) // App. III (a): 30 m while E ≤ 135.5 MJ
      expect(await figure(page, 'calc-pressure-bar')).toBe(10)
      expect(await figure(page, 'calc-pressure-psi')).toBe(145.0) // NIST SP 811 B.8: 10 bar = 145.0 psi
      expectWithin(await figure(page, 'calc-scaled-distance'), 1.722, 0.005) // 20·TNT^⅓ = 1.722 m (App. III (b))

      // The later edition's form: 20·(2·TNT)^⅓ = 2.170 m, still under the floor.
      await page.getByTestId('calc-rule-2tnt').check()
      await expect.poll(() => figure(page, 'calc-scaled-distance')).toBe(2.17)
      expect(await figure(page, 'calc-distance')).toBe(30)

      // A 2 L bottle a third full of water at 90 psi: 1.333 L of air, E 1035 J, TNT 2.424e-4 kg.
      await page.getByTestId('calc-unit').selectOption('psi')
      await page.getByLabel('Gauge pressure').fill('90')
      await page.getByLabel('Vessel volume (L)').fill('2')
      await page.getByLabel('Water (L)').fill('0.6666667')
      await expect.poll(() => figure(page, 'calc-energy')).toBeCloseTo(1035, -1)
      expectWithin(await figure(page, 'calc-energy'), 1035, PCC2_TOLERANCE) // ASME PCC-2 App. II
      expectWithin(await figure(page, 'calc-tnt') / 1000, 2.424e-4, PCC2_TOLERANCE) // ASME PCC-2 App. II
      expect(await figure(page, 'calc-pressure-psi')).toBe(90)
      expect(await figure(page, 'calc-pressure-bar')).toBe(6.21) // NIST SP 811 B.8: 90 psi = 6.205 bar

      // Water filling the vessel is refused in words, and the input is marked.
      await page.getByLabel('Water (L)').fill('2')
      await page.getByTestId('calc-error').waitFor()
      expect(await page.getByTestId('calc-error').textContent()).toMatch(/less than the vessel volume/)
      expect(await page.getByLabel('Water (L)').getAttribute('aria-invalid')).toBe('true')

      // Nothing spills sideways at 375 px.
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(375)
    }
    finally {
      await page.close()
    }
  })

  it('sits in a signed-in member\'s navigation and works from the keyboard', async () => {
    const page = await signedInPage(DEMO.member, DEMO.password)
    try {
      await page.getByTestId('nav-calculator').click()
      await page.waitForURL(url => url.pathname === '/calculator')
      await page.getByTestId('calc-pressure').focus()
      await page.keyboard.type('20')
      await page.keyboard.press('Tab') // to the unit
      await page.keyboard.press('Tab') // to the vessel volume
      await page.keyboard.type('1.5')
      // 1.5 L of air at 20 bar gauge: E 4571 J (ASME PCC-2 (2008) Mandatory App. II).
      await expect.poll(() => figure(page, 'calc-energy')).toBeCloseTo(4571, -1)
      expectWithin(await figure(page, 'calc-energy'), 4571, PCC2_TOLERANCE)
      expectWithin(await figure(page, 'calc-tnt') / 1000, 1.071e-3, PCC2_TOLERANCE)
    }
    finally {
      await page.close()
    }
  })
})
