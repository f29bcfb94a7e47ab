import { describe, expect, it } from 'vitest'
import { setupBrowser, goTo, signedInPage } from '../support/browser'
import { DEMO } from '../support/test-env'

await setupBrowser()

describe('the audit desk page', () => {
  it('shows the safety officer the counts, a table, another table on choosing its count, and the charts\' numbers', async () => {
    const page = await signedInPage(DEMO.safety, DEMO.password)
    try {
      await goTo(page, '/audit/desk')
      await page.getByRole('heading', { name: 'Audit desk' }).waitFor()
      await page.getByTestId('desk-tiers-expiring').waitFor()
      await page.getByTestId('desk-count-vessels-held').click()
      await page.getByTestId('desk-vessels-held').waitFor()
      expect(new URL(page.url()).searchParams.get('table')).toBe('vessels-held')
      expect(await page.getByTestId('desk-csv').getAttribute('href')).toMatch(/^\/api\/audit\/desk\/vessels-held\/export/)
      await page.getByTestId('desk-chart-expiries-table').waitFor({ state: 'attached' })
      expect(await page.getByTestId('desk-chart-expiries-table').locator('tbody tr').count()).toBe(26)
    }
    finally {
      await page.close()
    }
  })
})
