import { describe, expect, it } from 'vitest'
import { setupBrowser, goTo, signedInPage } from '../support/browser'
import type { Page } from 'playwright-core'
import { makeClub, makeMember, type MadeMember } from '../support/factories'
import { sql } from '../support/db'

await setupBrowser()
async function signedIn(m: MadeMember): Promise<Page> {
  const page = await signedInPage(m.email, m.password)
  await page.getByTestId('attention').waitFor()
  return page
}

describe('a member\'s own screens', () => {
  it('goes from "needs attention" to an accepted waiver, then sees it on the standing page', async () => {
    const member = await makeMember({ acceptWaiver: false, name: 'Tamsin Wadeholm' })
    const page = await signedIn(member)
    try {
      const item = page.locator('[data-testid="attention-item"][data-code="WAIVER_NOT_ACCEPTED"]')
      await item.waitFor()
      await item.getByRole('link').click()
      await page.waitForURL(url => url.pathname === '/waiver')
      await page.getByTestId('waiver-text').waitFor()
      expect(await page.getByTestId('waiver-state').getAttribute('data-current')).toBe('false')
      expect(await page.getByTestId('cautions').textContent()).toMatch(/full of water/)

      // The box must be ticked, and the name must be the member's own.
      await page.getByTestId('waiver-typed-name').fill('Someone Else')
      await page.getByTestId('waiver-accept').click()
      await page.getByTestId('error-read').waitFor()
      await page.getByTestId('waiver-read').check()
      await page.getByTestId('waiver-accept').click()
      const refusal = page.getByTestId('waiver-accept-form').getByTestId('form-error')
      await refusal.waitFor()
      expect(await refusal.textContent()).toMatch(/Type your full name/)

      await page.getByTestId('waiver-typed-name').fill('tamsin wadeholm')
      await page.getByTestId('waiver-accept').click()
      await page.locator('[data-testid="waiver-state"][data-current="true"]').waitFor()
      expect(await page.getByTestId('waiver-accept-form').count()).toBe(0)
      const [row] = await sql<{ typed_name: string }>(`SELECT typed_name FROM waiver_acceptances WHERE membership_id = $1`, [member.memberId])
      expect(row?.typed_name).toBe('tamsin wadeholm')

      await page.getByTestId('nav-standing').click()
      await page.waitForURL(url => url.pathname === '/standing')
      expect(await page.getByTestId('waiver-line').textContent()).toMatch(/Accepted/)
      expect(await page.getByTestId('status-chip').textContent()).toBe('Active')
      // No tier yet: the tiers section says so and names what T0 still needs.
      expect(await page.getByTestId('standing-tiers').textContent()).toMatch(/No pressure tier is recorded yet/)
      expect(await page.getByTestId('standing-tiers').getByTestId('tier-gap-COURSE_NOT_CURRENT').count()).toBe(1)
      // The training section lists every course; a new member has taken none.
      await page.getByTestId('standing-training').getByTestId('course-composite_ppe').waitFor()
      expect(await page.getByTestId('standing-training').getByTestId('course-standing-never_taken').count()).toBe(7)
      // The vessels have their own page; the standing points there.
      await page.getByTestId('standing-to-vessels').click()
      await page.waitForURL(url => url.pathname === '/vessels')
    }
    finally {
      await page.close()
    }
  })

  it('edits the profile: field errors beside the field, then saved, and the header shows the new name', async () => {
    const member = await makeMember({ name: 'Gorse Ebbridge' })
    const page = await signedIn(member)
    try {
      await page.getByTestId('nav-profile').click()
      await page.waitForURL(url => url.pathname === '/profile')
      await page.getByTestId('profile-form').waitFor()
      await page.getByTestId('field-phone').fill('call me')
      await page.getByTestId('profile-save').click()
      await page.getByTestId('error-phone').waitFor()

      await page.getByTestId('field-phone').fill('+44 1632 960999')
      await page.getByTestId('field-name').fill('Gorse Ebbridge-Kelp')
      await page.getByTestId('field-emergencyContactName').fill('Heddwyn Ebbridge')
      await page.getByTestId('unit-psi').check()
      await page.getByTestId('profile-save').click()
      await page.getByTestId('form-ok').waitFor()
      await page.waitForFunction(() => document.querySelector('[data-testid="nav-profile"]')?.textContent?.includes('Gorse Ebbridge-Kelp'))
      const [row] = await sql<{ name: string, phone: string, unit_preference: string }>(
        `SELECT u.name, m.phone, m.unit_preference FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.id = $1`, [member.memberId])
      expect(row).toEqual({ name: 'Gorse Ebbridge-Kelp', phone: '+44 1632 960999', unit_preference: 'psi' })

      await goTo(page, '/profile')
      expect(await page.getByTestId('unit-psi').isChecked()).toBe(true)
    }
    finally {
      await page.close()
    }
  })
})

describe('the safety officer\'s waiver desk', () => {
  it('publishes a version after confirming, sees it in the history, and is asked to accept it too', async () => {
    const club = await makeClub()
    const officer = await makeMember({ clubId: club.id, roles: ['instructor', 'safety_officer'], name: 'Delphine Reedmere' })
    const page = await signedIn(officer)
    try {
      await goTo(page, '/waiver')
      await page.getByTestId('waiver-none').waitFor()
      await page.getByTestId('waiver-title-input').fill('Reedmere club waiver')
      await page.getByTestId('waiver-body-input').fill('Proof tests are done full of water and from a distance. Eye protection at the pad.')
      await page.getByTestId('waiver-publish').click()
      const confirm = page.getByTestId('waiver-publish-confirm')
      await confirm.waitFor()
      expect(await confirm.textContent()).toMatch(/Everyone will be asked to accept again/)

      await page.getByTestId('waiver-publish-cancel').click()
      await confirm.waitFor({ state: 'detached' })
      expect(await sql(`SELECT 1 FROM waivers WHERE club_id = $1`, [club.id])).toEqual([])

      await page.getByTestId('waiver-publish').click()
      await page.getByTestId('waiver-publish-yes').click()
      await page.getByTestId('waiver-text').waitFor()
      expect(await page.getByTestId('waiver-text').textContent()).toContain('Reedmere club waiver')
      expect(await page.getByTestId('waiver-state').getAttribute('data-current')).toBe('false')
      await page.locator('[data-testid="waiver-version"][data-version="1"]').waitFor()
      expect(await page.getByTestId('waiver-acceptances').textContent()).toBe('0')
    }
    finally {
      await page.close()
    }
  })
})
