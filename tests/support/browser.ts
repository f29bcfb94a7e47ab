// Browser journeys: @nuxt/test-utils drives Debian's Chromium through playwright-core against the
// shared test server (never `playwright install`).
import { inject } from 'vitest'
import { setup, createPage } from '@nuxt/test-utils/e2e'
import type { Page } from 'playwright-core'

/** The flags that keep Chromium from dialling out on a closed network. */
export const CHROMIUM_ARGS = ['--no-sandbox', '--disable-gpu', '--disable-background-networking',
  '--disable-component-update', '--disable-sync', '--no-first-run']

/** Call at the top of a browser test file: points @nuxt/test-utils at the shared server with Chromium. */
export async function setupBrowser(): Promise<void> {
  await setup({
    host: inject('baseUrl'),
    browser: true,
    browserOptions: { type: 'chromium', launch: { executablePath: '/usr/bin/chromium', args: CHROMIUM_ARGS } },
  })
}

/** Opens `path` as if typed in the address bar and waits for the app to hydrate; fails on any policy violation. */
export async function goTo(page: Page, path: string): Promise<void> {
  const violations = await watchPolicyViolations(page)
  await page.goto(new URL(path, inject('baseUrl')).href)
  // A function, not a string: the page's policy forbids eval, which a string predicate needs.
  await page.waitForFunction(() => (window as unknown as { useNuxtApp?: () => { isHydrating: boolean } }).useNuxtApp?.().isHydrating === false)
  if (violations.length) throw new Error(`policy violations on ${path}:\n${violations.join('\n')}`)
}

const policyViolations = new WeakMap<Page, string[]>()
const REPORT_VIOLATIONS = `document.addEventListener('securitypolicyviolation', (e) =>
  window.__reportPolicyViolation(e.violatedDirective + ' blocked ' + (e.blockedURI || 'inline') + ' on ' + e.documentURI))`

/**
 * The content-security and permissions policy violations `page` meets from now on (its
 * `securitypolicyviolation` events and the browser's console reports), collected into the returned list.
 */
export async function watchPolicyViolations(page: Page): Promise<string[]> {
  const known = policyViolations.get(page)
  if (known) return known
  const violations: string[] = []
  policyViolations.set(page, violations)
  page.on('console', (message) => {
    if (/Content Security Policy|Permissions policy|Refused to/i.test(message.text())) violations.push(message.text())
  })
  await page.exposeFunction('__reportPolicyViolation', (text: string) => violations.push(text))
  await page.addInitScript(REPORT_VIOLATIONS)
  await page.evaluate(REPORT_VIOLATIONS)
  return violations
}

/** Fills and submits the sign-in form on `page` (already on /login); does not wait for the outcome. */
export async function submitSignIn(page: Page, email: string, password: string): Promise<void> {
  await page.getByTestId('field-email').fill(email)
  await page.getByTestId('field-password').fill(password)
  await page.getByTestId('login-submit').click()
}

/** A new page signed in through the form, on the dashboard. */
export async function signedInPage(email: string, password: string): Promise<Page> {
  const page = await createPage('/login')
  await watchPolicyViolations(page)
  await submitSignIn(page, email, password)
  await page.waitForURL(url => url.pathname === '/')
  return page
}
