import { describe, it, expect } from 'vitest'
import { setupBrowser, signedInPage, goTo } from '../support/browser'
import { makeMember, noticesOf, setNotice } from '../support/factories'
import { api } from '../support/http'
import { DEMO } from '../support/test-env'

await setupBrowser()

describe('the outbox', () => {
  it('shows an admin the notices and runs the queue on demand', async () => {
    // Something for the outbox to show: a member whose dues run out soon, reminded by a run.
    // (Ten days: only the 30-day reminder is due, the week-before one not yet.)
    const member = await makeMember({ paidDays: 10 })
    expect((await api('/api/outbox/run', { method: 'POST', as: 'admin' })).status).toBe(200)
    const later = await makeMember({ paidDays: 9 })
    const [reminder] = await noticesOf(member.memberId)
    await setNotice(reminder!, { status: 'failed', lastError: '550 No such mailbox (browser test)' })

    const page = await signedInPage(DEMO.admin, DEMO.password)
    await page.getByTestId('nav-outbox').first().click()
    await page.waitForURL(url => url.pathname === '/outbox')

    await page.getByTestId('notice-row').first().waitFor()
    expect(await page.getByTestId('notice-row').count()).toBeGreaterThan(0)
    await expect.poll(() => page.getByTestId('outbox-pager-status').textContent()).toMatch(/Page 1 of \d+/)

    // Filter to failed notices: ours is there, with its error and a Retry that asks first.
    await page.getByTestId('outbox-filter-status').selectOption('failed')
    const row = page.locator('[data-testid="notice-row"]', { hasText: member.name })
    await row.waitFor()
    expect(await row.getByTestId('notice-status-failed').textContent()).toContain('Failed')
    expect(await row.getByTestId('notice-last-error').textContent()).toContain('550 No such mailbox')
    await row.getByTestId('notice-retry').click()
    await row.getByTestId('notice-retry-confirm').click()
    await page.getByTestId('form-ok').waitFor()
    expect(await page.getByTestId('form-ok').textContent()).toMatch(/back in the queue/)

    // Run the queue: the new member's reminder is queued and sent, and the run says so.
    await page.getByTestId('outbox-filter-status').selectOption('')
    await page.getByTestId('outbox-run').click()
    await expect.poll(() => page.getByTestId('form-ok').textContent()).toMatch(/Done: \d+ reminders? queued; \d+ sent/)
    await page.locator('[data-testid="notice-row"]', { hasText: later.name }).waitFor()
    await page.close()
  })

  it('turns away a member who types the address', async () => {
    const page = await signedInPage(DEMO.member, DEMO.password)
    expect(await page.getByTestId('nav-outbox').count()).toBe(0)
    await goTo(page, '/outbox')
    expect(new URL(page.url()).pathname).toBe('/')
    await page.close()
  })
})
