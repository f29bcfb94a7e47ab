import { describe, it, expect } from 'vitest'
import { setupBrowser, signedInPage, goTo } from '../support/browser'
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
})
