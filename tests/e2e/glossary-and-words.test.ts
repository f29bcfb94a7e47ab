import { describe, it, expect } from 'vitest'
import { createPage } from '@nuxt/test-utils/e2e'
import { goTo, setupBrowser, signedInPage } from '../support/browser'
import { makeMember } from '../support/factories'
import { DEMO } from '../support/test-env'

await setupBrowser()

const CODE_OR_PHRASE = /\b[A-Z][A-Z0-9]*(?:_[A-Z0-9]+)+\b|Unprocessable Entity|Bad Request|Unauthorized|Forbidden|Too Many Requests|\(\w+\.\w+\)/

describe('words a club secretary understands', () => {
  it('the glossary is linked from the sign-in page and explains the trade words with a caution', async () => {
    const page = await createPage()
    try {
      await goTo(page, '/login')
      await page.getByTestId('footer-glossary').click()
      await page.getByTestId('glossary').waitFor()
      expect(new URL(page.url()).pathname).toBe('/glossary')
      const terms = await page.locator('[data-testid="glossary-entry"] dt').allTextContents()
      expect(terms.map(t => t.trim())).toEqual(expect.arrayContaining(['Fill', 'Fill cap', 'Proof test', 'Rated fill', 'In service', 'Standoff']))
      expect(await page.getByTestId('glossary-caution').textContent()).toContain('local codes')
    }
    finally {
      await page.close()
    }
  })

  it('a refused sign-in and a new sign-up say things in words, with the joining caution', async () => {
    const page = await createPage()
    try {
      await goTo(page, '/login')
      await page.getByTestId('field-email').fill('nobody-here@hoopwise.example')
      await page.getByTestId('field-password').fill('not the right password at all')
      await page.getByTestId('login-submit').click()
      const error = page.getByTestId('form-error')
      await error.waitFor()
      expect(await error.textContent()).not.toMatch(CODE_OR_PHRASE)

      await goTo(page, '/signup')
      expect(await page.getByTestId('joining-caution').textContent()).toContain('Water rockets store real energy.')
    }
    finally {
      await page.close()
    }
  })

  it('a member awaiting approval is shown as such, not as "Pending"', async () => {
    const member = await makeMember({ paidDays: null, approved: false })
    const page = await signedInPage(DEMO.admin, DEMO.password)
    try {
      await goTo(page, `/members/${member.memberId}`)
      const chip = page.getByTestId('member-status')
      await chip.waitFor()
      expect((await chip.textContent())?.trim()).toBe('Awaiting approval')
    }
    finally {
      await page.close()
    }
  })
})
