import { describe, expect, it } from 'vitest'
import { setupBrowser, goTo, signedInPage } from '../support/browser'
import { makeMember, makeTier, makeTrainingRecord } from '../support/factories'
import { sql } from '../support/db'

await setupBrowser()

describe('imported records in the browser', () => {
  it('an instructor confirms an imported tier and rejects an imported record with a reason', async () => {
    const instructor = await makeMember({ roles: ['instructor'], name: 'Iwan Vouchwell' })
    await makeTier({ memberId: instructor.memberId, rank: 3 })
    const member = await makeMember({ name: 'Prue Importwood' })
    const { memberTierId } = await makeTier({ memberId: member.memberId, rank: 1, imported: true })
    const { recordId } = await makeTrainingRecord({ memberId: member.memberId, course: 'pressure_safety', trainerId: instructor.memberId, imported: true })

    const page = await signedInPage(instructor.email, instructor.password)
    try {
      await goTo(page, '/training')
      await page.getByTestId('to-imported-records').click()
      await page.waitForURL(url => url.pathname === '/imported-records')
      await page.getByTestId(`confirm-${memberTierId}`).click()
      await page.getByTestId(`confirm-yes-${memberTierId}`).click()
      await expect.poll(() => page.getByTestId('form-ok').first().textContent()).toMatch(/Prue Importwood, T1 .*confirmed/)
      expect(await page.getByTestId(`confirm-${memberTierId}`).count()).toBe(0)

      await page.getByTestId(`reject-${recordId}`).click()
      await page.getByTestId(`reject-reason-${recordId}`).fill('No certificate in the old files')
      await page.getByTestId(`reject-yes-${recordId}`).click()
      await expect.poll(() => page.getByText(/rejected and deleted/).count()).toBe(1)
    }
    finally {
      await page.close()
    }
    const [tier] = await sql<{ confirmed_by_membership_id: string }>('SELECT confirmed_by_membership_id FROM member_tiers WHERE id = $1', [memberTierId])
    expect(tier!.confirmed_by_membership_id).toBe(instructor.memberId)
    expect(await sql('SELECT 1 FROM training_records WHERE id = $1', [recordId])).toEqual([])
  })

  it('an admin sends the welcome from the members directory', async () => {
    const admin = await makeMember({ roles: ['admin'] })
    const imported = await makeMember({ passwordHash: null, name: 'Wendel Newcomer' })
    const page = await signedInPage(admin.email, admin.password)
    try {
      await goTo(page, '/members')
      await page.getByTestId('welcome-send').click()
      await page.getByTestId('welcome-send-yes').click()
      await expect.poll(() => page.getByTestId('member-welcome').textContent()).toMatch(/on its way|are on their way/)
    }
    finally {
      await page.close()
    }
    expect(await sql(`SELECT 1 FROM notices WHERE membership_id = $1 AND kind = 'welcome'`, [imported.memberId])).toHaveLength(1)
  })
})
