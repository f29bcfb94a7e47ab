import { describe, it, expect } from 'vitest'
import { setupBrowser, signedInPage, goTo } from '../support/browser'
import { DEMO } from '../support/test-env'
import { clubDay, makeMember } from '../support/factories'
import { sql } from '../support/db'
import { waitForMail } from '../support/mail'

await setupBrowser()

const paidThroughOf = async (memberId: string) =>
  (await sql<{ p: string | null }>('SELECT paid_through::text AS p FROM memberships WHERE id = $1', [memberId]))[0]!.p

/** A year on from `date` by the calendar, worked out here apart from the app's helper. */
function yearOn(date: string): string {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number]
  const last = new Date(Date.UTC(y + 1, m, 0)).getUTCDate()
  return new Date(Date.UTC(y + 1, m - 1, Math.min(d, last))).toISOString().slice(0, 10)
}

describe('renewing dues through the payment page', () => {
  it('a declined card leaves a lapsed member lapsed with the reason; the success card makes them active, with a receipt', async () => {
    const member = await makeMember({ paidDays: -60 })
    const page = await signedInPage(member.email, member.password)
    await goTo(page, '/standing')
    await page.getByTestId('standing-renew').click()
    await page.waitForURL(url => url.pathname === '/dues/renew')
    await page.getByTestId('renew-plan-adult').check()

    // A declined card: the test page says so and offers the way back.
    await page.getByTestId('renew-pay').click()
    await page.waitForURL(url => url.pathname.startsWith('/pay/cs_test_'))
    expect(await page.textContent('body')).toContain('TEST DOUBLE')
    await page.getByTestId('fake-card-number').fill('4000 0000 0000 0002')
    await page.getByTestId('fake-expiry').fill('12/40')
    await page.getByTestId('fake-cvc').fill('123')
    await page.getByTestId('fake-pay').click()
    expect(await page.getByTestId('fake-error').textContent()).toContain('Your card was declined.')
    await page.getByTestId('fake-cancel').click()
    await page.waitForURL(url => url.pathname === '/dues/return')
    await expect.poll(() => page.getByTestId('return-state').textContent()).toContain('The payment did not go through: Your card was declined.')
    expect(await paidThroughOf(member.memberId)).toBe(clubDay(-60))

    // Again, with the success card.
    await page.getByTestId('return-retry').click()
    await page.waitForURL(url => url.pathname === '/dues/renew')
    await page.getByTestId('renew-plan-adult').check()
    await page.getByTestId('renew-pay').click()
    await page.waitForURL(url => url.pathname.startsWith('/pay/cs_test_'))
    await page.getByTestId('fake-card-number').fill('4242 4242 4242 4242')
    await page.getByTestId('fake-expiry').fill('12/40')
    await page.getByTestId('fake-cvc').fill('123')
    await page.getByTestId('fake-pay').click()
    await page.waitForURL(url => url.pathname === '/dues/return')
    const until = yearOn(clubDay(0))
    const [y, m, d] = until.split('-').map(Number) as [number, number, number]
    const words = new Date(Date.UTC(y, m - 1, d)).toLocaleDateString('en-GB', { day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' })
    await expect.poll(() => page.getByTestId('return-state').textContent(), { timeout: 20_000 }).toContain('active until')
    expect(await page.getByTestId('return-state').textContent()).toContain(words)
    expect(await paidThroughOf(member.memberId)).toBe(until)
    const receipt = await waitForMail(member.email, /receipt R-\d{6}/)
    expect(receipt.text).toContain('Adult')

    await page.getByTestId('return-receipt').click()
    await page.waitForURL(url => url.pathname.startsWith('/dues/receipts/'))
    expect(await page.getByTestId('receipt-amount').textContent()).toContain('EUR 60.00')
    await page.close()
  })

  it('the admin changes the Student plan\'s price after confirming; the renewal page shows the new price', async () => {
    const [plan] = await sql<{ id: string, price_minor: number, currency: string }>(
      `SELECT p.id, p.price_minor, p.currency FROM dues_plans p JOIN clubs c ON c.id = p.club_id WHERE p.code = 'student' ORDER BY c.created_at LIMIT 1`)
    const newPrice = plan!.price_minor + 1234
    const words = `${plan!.currency} ${(newPrice / 100).toFixed(2)}`
    const admin = await signedInPage(DEMO.admin, DEMO.password)
    try {
      await goTo(admin, '/dues/payments')
      await admin.getByTestId('plan-edit-student').click()
      await admin.getByTestId('plan-price-student').fill(String(newPrice))
      await admin.getByTestId('plan-save-student').click()
      await admin.getByTestId('plan-confirm-student').waitFor()
      expect((await sql<{ p: number }>('SELECT price_minor AS p FROM dues_plans WHERE id = $1', [plan!.id]))[0]!.p).toBe(plan!.price_minor)
      await admin.getByTestId('plan-confirm-student').click()
      expect(await admin.getByTestId('plan-form-student').getByTestId('form-ok').textContent()).toContain(words)
      expect(await admin.getByTestId('plan-row-student').textContent()).toContain(words)

      const member = await makeMember()
      const page = await signedInPage(member.email, member.password)
      try {
        await goTo(page, '/dues/renew')
        const label = page.locator('label', { has: page.getByTestId('renew-plan-student') })
        expect(await label.textContent()).toContain(words)
      }
      finally {
        await page.close()
      }
    }
    finally {
      await admin.close()
      await sql('UPDATE dues_plans SET price_minor = $2 WHERE id = $1', [plan!.id, plan!.price_minor])
    }
  })
})
