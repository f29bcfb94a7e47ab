import { describe, expect, it } from 'vitest'
import { setupBrowser, goTo, signedInPage } from '../support/browser'
import { makeMember, type MadeMember } from '../support/factories'
import { api, sessionCookieOf } from '../support/http'

await setupBrowser()

const PHONE = 'Mozilla/5.0 (iPhone; CPU iPhone OS 17_5 like Mac OS X) AppleWebKit/605.1.15 (KHTML, like Gecko) Version/17.5 Mobile/15E148 Safari/604.1'
const TABLET = 'Mozilla/5.0 (iPad; CPU OS 17_5 like Mac OS X) AppleWebKit/605.1.15 (KHTML, like Gecko) Version/17.5 Mobile/15E148 Safari/604.1'

/** A session of `m` begun elsewhere (through the API, as another browser); returns its cookie. */
async function elsewhere(m: MadeMember, userAgent: string): Promise<string> {
  const res = await api('/api/auth/login', { body: { email: m.email, password: m.password }, headers: { 'user-agent': userAgent } })
  expect(res.status).toBe(200)
  return sessionCookieOf(res)
}

describe('my sessions on the profile page', () => {
  it('lists this device and the others, signs out one, then everywhere else after asking once more (by keyboard)', async () => {
    const m = await makeMember()
    const phone = await elsewhere(m, PHONE)
    const tablet = await elsewhere(m, TABLET)
    const page = await signedInPage(m.email, m.password)
    try {
      await goTo(page, '/profile')
      const list = page.getByTestId('session-list')
      await list.waitFor()
      expect(await page.getByTestId('session-current').count()).toBe(1)
      expect(await page.getByTestId('session-current').textContent()).toMatch(/This device/)
      expect(await page.getByTestId('session-other').count()).toBe(2)

      const phoneRow = page.getByTestId('session-other').filter({ hasText: 'Safari on iPhone' })
      await phoneRow.getByRole('button', { name: /Sign out/ }).click()
      const ok = page.getByTestId('account-sessions').getByTestId('form-ok')
      await ok.waitFor()
      expect(await ok.textContent()).toMatch(/Safari on iPhone is signed out/)
      expect((await api('/api/me/standing', { as: phone })).status).toBe(401)
      // The message may show before the list has reloaded: wait for the list.
      await expect.poll(() => page.getByTestId('session-other').count()).toBe(1)

      // "Everywhere else" asks first; the keyboard lands on the confirming button.
      await page.getByTestId('sessions-sign-out-others').focus()
      await page.keyboard.press('Enter')
      await page.getByTestId('sessions-confirm').waitFor()
      expect(await page.evaluate(() => document.activeElement?.getAttribute('data-testid'))).toBe('sessions-confirm-yes')
      expect((await api('/api/me/standing', { as: tablet })).status).toBe(200)
      await page.keyboard.press('Enter')
      await page.getByTestId('session-other').first().waitFor({ state: 'detached' })
      expect(await ok.textContent()).toMatch(/One other session is signed out/)
      expect((await api('/api/me/standing', { as: tablet })).status).toBe(401)

      // This device is still signed in.
      await goTo(page, '/profile')
      expect(new URL(page.url()).pathname).toBe('/profile')
      expect(await page.getByTestId('session-current').count()).toBe(1)
    }
    finally {
      await page.close()
    }
  })
})
