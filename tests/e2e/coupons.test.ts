import { describe, expect, it } from 'vitest'
import { setupBrowser, signedInPage } from '../support/browser'
import { makeClub, makeMember } from '../support/factories'

await setupBrowser()

describe('coupon bursts', () => {
  it('a member records a coupon and sees its family\'s calibration factor, in psi first as they prefer', async () => {
    const club = await makeClub({ tagPrefix: 'CPN' })
    const member = await makeMember({ clubId: club.id, unitPreference: 'psi' })
    const page = await signedInPage(member.email, member.password)
    try {
      await page.getByTestId('nav-coupons').first().click()
      await page.waitForURL(url => url.pathname === '/coupons')
      await page.getByTestId('coupon-families-empty').waitFor()
      expect(await page.getByTestId('coupon-cautions').textContent()).toMatch(/sensitise skin.*gloves.*respirator.*only a witnessed proof test sets/s)

      // Nothing chosen or typed yet: the shared schema answers beside the fields, nothing is sent.
      await page.getByTestId('coupon-submit').click()
      await page.getByTestId('error-resin').waitFor()

      await page.getByTestId('field-fibreClass').selectOption('e_glass')
      await page.getByTestId('field-arealWeightGPerM2').fill('300')
      await page.getByTestId('field-plies').fill('3')
      await page.getByTestId('field-resin').fill('Laminating epoxy')
      await page.getByTestId('field-tubeDiameterMm').fill('100')
      await page.getByTestId('field-burstPressure').fill('6.112')
      await page.getByTestId('field-pressureUnit').selectOption('MPa')
      await page.getByTestId('coupon-submit').click()
      await page.getByTestId('form-ok').waitFor()

      // 6.112 MPa = 61.12 bar against the estimate 61.12 bar (3 × 300 g/m² E-glass woven on 100 mm, Vf 0.35,
      // k_process 0.5: arithmetic check): a factor of 1.00 from one coupon.
      const family = page.getByTestId('coupon-family')
      await family.waitFor()
      expect(await family.getByTestId('coupon-family-factor').textContent()).toMatch(/1\.00.*median of 1 coupon/s)
      const row = await family.getByTestId('coupon-row').textContent()
      // 61.12 bar = 886 psi (NIST SP 811 B.8), shown first; bar in small print.
      expect(row).toMatch(/886 psi\s*61\.1 bar/)
    }
    finally {
      await page.close()
    }
  })
})
