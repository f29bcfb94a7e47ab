import { randomUUID } from 'node:crypto'
import { describe, expect, it } from 'vitest'
import Papa from 'papaparse'
import { goTo, setupBrowser, signedInPage } from '../support/browser'
import { makeMember } from '../support/factories'
import { sql } from '../support/db'

await setupBrowser()

describe('moving a club in', () => {
  it('an admin imports a 200-row file with 3 bad rows: preview, refusals, progress to the end, the new members in the directory', async () => {
    const admin = await makeMember({ roles: ['admin'] })
    const tag = randomUUID().slice(0, 6)
    const rows = Array.from({ length: 200 }, (_, i) => [`Rover${tag} Number${i}`, `rover${i}-${tag}@import.example`, '+44 20 7946 1000', '14/02/1990', '31/12/2027'])
    rows[10]![1] = 'not-an-address'
    rows[50]![3] = '31/02/1990'
    rows[120]![0] = ''
    const csv = `\uFEFF${Papa.unparse([['Full name', 'Email', 'Phone', 'Date of birth', 'Paid until'], ...rows], { delimiter: ';', newline: '\r\n' })}\r\n`

    const page = await signedInPage(admin.email, admin.password)
    try {
      await goTo(page, '/members')
      await page.getByTestId('members-import-link').click()
      await page.waitForURL(url => url.pathname === '/members/import')
      await page.getByTestId('import-file').setInputFiles({ name: 'roster.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) })
      await page.getByTestId('import-upload').click()

      // The preview shows the first rows as written; the columns were matched from their headings.
      const preview = page.getByTestId('import-preview')
      await preview.waitFor()
      expect(await preview.textContent()).toContain(`Rover${tag} Number0`)
      expect(await page.getByTestId('map-email').inputValue()).toBe('1')
      await page.getByTestId('import-date-format').selectOption('dmy')
      await page.getByTestId('import-dry-run').click()

      await page.getByTestId('import-counts').waitFor()
      expect(await page.getByTestId('count-create').textContent()).toMatch(/197/)
      expect(await page.getByTestId('count-refused').textContent()).toMatch(/3/)
      expect(await page.getByTestId('import-row-refused').count()).toBe(3)
      expect(await page.getByTestId('import-rows').textContent()).toMatch(/Not a calendar date/)
      expect(await page.getByTestId('import-refused-download').getAttribute('href')).toMatch(/\/refused$/)

      await page.getByTestId('import-start').click()
      await page.getByTestId('import-confirm').click()
      // The progress bar moves to the end; a reload finds the same job by its address.
      const bar = page.getByTestId('import-progress')
      await bar.waitFor()
      await page.reload()
      await page.getByTestId('import-done').waitFor({ timeout: 60_000 })
      expect(await bar.getAttribute('aria-valuenow')).toBe('200')
      expect(await page.getByTestId('import-progress-text').textContent()).toMatch(/200 of 200 rows · 3 refused/)

      await page.getByRole('link', { name: 'See the members' }).click()
      await page.waitForURL(url => url.pathname === '/members')
      await page.getByTestId('member-search').fill(`Rover${tag}`)
      await expect.poll(() => page.getByTestId('members-total').textContent(), { timeout: 10_000 }).toMatch(/197/)
      expect(await page.getByTestId('member-row').first().textContent()).toContain(`Rover${tag}`)
    }
    finally {
      await page.close()
    }
    const [made] = await sql<{ n: string }>('SELECT count(*) AS n FROM users WHERE email LIKE $1 AND password_hash IS NULL', [`%-${tag}@import.example`])
    expect(Number(made!.n)).toBe(197)
  })
})
