import { describe, expect, it } from 'vitest'
import { createPage } from '@nuxt/test-utils/e2e'
import type { Page } from 'playwright-core'
import { setupBrowser, goTo, signedInPage, submitSignIn } from '../support/browser'
import { makeClub, makeMember, NOW, setUser } from '../support/factories'
import { sql } from '../support/db'
import { DEMO } from '../support/test-env'

await setupBrowser()

/** The data-testid of the element that has keyboard focus ('BODY' when focus fell to the page). */
const focused = (page: Page) => page.evaluate(() => document.activeElement?.getAttribute('data-testid') ?? document.activeElement?.tagName ?? null)
/** The text of the element that has keyboard focus. */
const focusedText = (page: Page) => page.evaluate(() => document.activeElement?.textContent?.trim() ?? '')

describe('keyboard focus in forms', () => {
  it('sign-in: Enter on an empty form focuses the first invalid field, with the schema\'s own messages', async () => {
    const someone = await makeMember()
    const page = await createPage('/login')
    try {
      await page.getByTestId('login-submit').focus()
      await page.keyboard.press('Enter')
      await expect.poll(() => focused(page)).toBe('field-email')
      expect(await page.getByTestId('field-email').getAttribute('aria-invalid')).toBe('true')
      expect(await page.getByTestId('error-email').textContent()).toContain('Enter an e-mail address')
      expect(await page.getByTestId('error-password').textContent()).toContain('Enter your password')

      // A refusal without field errors (wrong password) moves focus to the message.
      await submitSignIn(page, someone.email, 'not-the-password')
      await expect.poll(() => focused(page)).toBe('form-error')
      expect(await page.getByTestId('form-error').textContent()).toMatch(/wrong/i)
      // The button was only aria-disabled while busy, so it is back to normal.
      expect(await page.getByTestId('login-submit').getAttribute('aria-disabled')).toBe('false')
    }
    finally {
      await page.close()
    }
  })

  it('sign-up: invalid submit focuses the first field; a 409 goes away once a field changes or the form is sent again', async () => {
    const page = await createPage('/signup')
    try {
      await page.getByTestId('signup-submit').focus()
      await page.keyboard.press('Enter')
      await expect.poll(() => focused(page)).toBe('field-name')
      expect(await page.getByTestId('error-name').isVisible()).toBe(true)

      await page.getByTestId('field-name').fill('Orla Saltgrass')
      await page.getByTestId('field-email').fill(DEMO.member)
      await page.getByTestId('field-password').fill('a-long-password-4')
      await page.getByTestId('field-birthDate').fill('1990-05-05')
      await page.getByTestId('signup-submit').click()
      const refusal = page.getByTestId('form-error')
      await refusal.waitFor()
      expect(await refusal.textContent()).toMatch(/already/i)

      // Sent again with a new field error: the old server message does not stay beside it.
      await page.getByTestId('field-name').fill('')
      await refusal.waitFor({ state: 'detached' })
      await page.getByTestId('signup-submit').click()
      await page.getByTestId('error-name').waitFor()
      expect(await page.getByTestId('form-error').count()).toBe(0)
      await expect.poll(() => focused(page)).toBe('field-name')
    }
    finally {
      await page.close()
    }
  })

  it('member page: focus follows each outcome, the dialog focuses its field and then its confirm button', async () => {
    const member = await makeMember({ name: 'Brisa Saltings' })
    const page = await signedInPage(DEMO.admin, DEMO.password)
    try {
      await goTo(page, `/members/${member.memberId}`)
      await page.getByTestId('edit-open').click()
      await expect.poll(() => focused(page)).toBe('field-name')
      await page.getByTestId('field-phone').fill('+44 1632 960123')
      await page.getByTestId('edit-save').click()
      await expect.poll(() => focusedText(page)).toBe('Details saved.')

      // Another change replaces that message instead of leaving "Details saved." behind.
      await page.getByTestId('role-instructor').check()
      await page.getByTestId('role-reason').fill('Runs the spring workshop')
      await page.getByTestId('role-save').click()
      await expect.poll(() => focusedText(page)).toContain('Roles saved')
      expect(await page.getByText('Details saved.').count()).toBe(0)

      await page.getByTestId('action-suspend').click()
      const dialog = page.getByTestId('action-dialog')
      await dialog.getByTestId('action-reason').waitFor()
      await expect.poll(() => focused(page)).toBe('action-reason')

      await page.keyboard.type('Left the pad unattended while pressurised')
      await dialog.getByTestId('action-submit').click()
      await dialog.getByTestId('action-confirm-text').waitFor()
      await expect.poll(() => focused(page)).toBe('action-submit')
      expect(await dialog.getByTestId('action-submit').textContent()).toContain('Yes, suspend')

      await page.keyboard.press('Enter')
      await expect.poll(() => page.getByTestId('member-status').textContent()).toBe('Suspended')
      await expect.poll(() => focusedText(page)).toBe('Membership updated.')
      // The roles message belonged to the earlier change.
      expect(await page.getByTestId('role-editor').getByTestId('form-ok').count()).toBe(0)
    }
    finally {
      await page.close()
    }
  })

  it('waiver publishing: the fields are locked while the question is open, and focus goes to it and back', async () => {
    const club = await makeClub()
    const officer = await makeMember({ clubId: club.id, roles: ['instructor', 'safety_officer'] })
    const page = await signedInPage(officer.email, officer.password)
    try {
      await goTo(page, '/waiver')
      await page.getByTestId('waiver-title-input').fill('Shingle club waiver')
      await page.getByTestId('waiver-body-input').fill('Fills are remote. Eye protection at the pad.')
      await page.getByTestId('waiver-publish').click()
      await page.getByTestId('waiver-publish-confirm').waitFor()
      await expect.poll(() => focused(page)).toBe('waiver-publish-yes')
      expect(await page.getByTestId('waiver-title-input').isEditable()).toBe(false)
      expect(await page.getByTestId('waiver-body-input').isEditable()).toBe(false)

      await page.getByTestId('waiver-publish-cancel').click()
      await expect.poll(() => focused(page)).toBe('waiver-publish')
      expect(await page.getByTestId('waiver-body-input').isEditable()).toBe(true)
      await page.getByTestId('waiver-body-input').fill('Fills are remote. Eye protection and gloves at the pad.')

      await page.getByTestId('waiver-publish').click()
      await page.getByTestId('waiver-publish-yes').click()
      await page.getByTestId('waiver-text').waitFor()
      expect(await page.getByTestId('waiver-text').textContent()).toContain('Eye protection and gloves at the pad.')
      await expect.poll(() => focused(page)).toBe('form-ok')
      const [row] = await sql<{ body: string }>('SELECT body FROM waivers WHERE club_id = $1', [club.id])
      expect(row!.body).toBe('Fills are remote. Eye protection and gloves at the pad.')
    }
    finally {
      await page.close()
    }
  })

  it('profile: an unconfirmed member asks for a new link there; "already confirmed" is said plainly', async () => {
    const member = await makeMember({ verified: false })
    const page = await signedInPage(member.email, member.password)
    try {
      await goTo(page, '/profile')
      await page.getByTestId('profile-resend-verification').click()
      const result = page.getByTestId('profile-resend-result')
      await expect.poll(() => result.textContent()).toContain(`on its way to ${member.email}`)
      await expect.poll(() => focused(page)).toBe('form-ok')

      // Confirmed meanwhile (in another tab): the next press says so instead of failing.
      await setUser(member.userId, { emailVerifiedAt: NOW })
      await page.getByTestId('profile-resend-verification').click()
      await expect.poll(() => result.textContent()).toContain('already confirmed')
      expect(await result.getByTestId('form-error').count()).toBe(0)
      await expect.poll(() => page.getByTestId('profile-email').textContent()).toContain('Confirmed')
      expect(await page.getByTestId('profile-resend-verification').count()).toBe(0)
    }
    finally {
      await page.close()
    }
  })
})
