import { describe, expect, it, inject } from 'vitest'
import { createPage } from '@nuxt/test-utils/e2e'
import { setupBrowser, goTo, signedInPage, watchPolicyViolations } from '../support/browser'
import { DEMO } from '../support/test-env'

await setupBrowser()

const SIGNED_OUT_PAGES = ['/login', '/signup', '/forgot-password', '/calculator']
const ADMIN_PAGES = ['/', '/standing', '/waiver', '/members', '/audit', '/outbox', '/profile']

describe('the content security policy in the browser', () => {
  it('lets every signed-out page load and hydrate without a single policy violation', async () => {
    const page = await createPage()
    try {
      const violations = await watchPolicyViolations(page)
      for (const path of SIGNED_OUT_PAGES) await goTo(page, path)
      expect(violations).toEqual([])
    }
    finally {
      await page.close()
    }
  })

  it('lets the admin reach every main page, with client-side navigation, without a policy violation', async () => {
    const page = await signedInPage(DEMO.admin, DEMO.password)
    try {
      const violations = await watchPolicyViolations(page)
      for (const path of ADMIN_PAGES) await goTo(page, path)
      // Client-side navigation loads further chunks through the nonce-trusted entry ('strict-dynamic').
      await page.getByTestId('nav-members').click()
      await page.waitForURL(url => url.pathname === '/members')
      await page.getByRole('table').waitFor()
      expect(violations).toEqual([])
    }
    finally {
      await page.close()
    }
  })

  it('blocks a script injected into the page without the nonce (as an injected comment would be), and the watcher reports it', async () => {
    const page = await createPage()
    try {
      const violations = await watchPolicyViolations(page)
      // The server's own answer, policy header and all, with one inline script slipped into the markup.
      await page.route('**/login', async (route) => {
        const response = await route.fetch()
        const html = (await response.text()).replace('</body>', '<script>window.__injected = true</script></body>')
        await route.fulfill({ response, body: html })
      })
      await page.goto(new URL('/login', inject('baseUrl')).href)
      await page.waitForFunction(() => (window as unknown as { useNuxtApp?: () => { isHydrating: boolean } }).useNuxtApp?.().isHydrating === false)
      expect(await page.evaluate(() => (window as unknown as { __injected?: boolean }).__injected)).toBeUndefined()
      await expect.poll(() => violations.length).toBeGreaterThan(0)
      expect(violations.join('\n')).toMatch(/script-src/)
    }
    finally {
      await page.close()
    }
  })
})
