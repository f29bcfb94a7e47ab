import { describe, expect, it, inject } from 'vitest'
import { createPage } from '@nuxt/test-utils/e2e'
import type { Response } from 'playwright-core'
import { setupBrowser, goTo } from '../support/browser'

await setupBrowser()

/** The most JavaScript the sign-in page may transfer on a first visit, compressed. */
const SIGN_IN_SCRIPT_BUDGET = 120 * 1024
// Nitro's compressPublicAssets skips files under 1 KiB (compressing them would not pay), so those
// may arrive as they are.
const SMALLEST_COMPRESSED = 1024
// Strings each library keeps in its minified code: zod's error class, vee-validate's devtools name.
const FORM_LIBRARIES = { 'zod': 'ZodError', 'vee-validate': 'vee-validate' }

describe('the weight of the sign-in page', () => {
  it(`transfers at most ${SIGN_IN_SCRIPT_BUDGET} bytes of brotli-compressed JavaScript on a first visit, form libraries outside the entry`, async () => {
    // A fresh page has its own browser context: an empty cache, as on a first visit.
    const page = await createPage()
    try {
      const scripts: Response[] = []
      page.on('response', (response) => {
        if (/javascript/.test(response.headers()['content-type'] ?? '')) scripts.push(response)
      })
      await goTo(page, '/login')
      // Chunks loaded after hydration (prefetched pages of the links on screen) count too.
      await page.waitForLoadState('networkidle')

      const rows = await Promise.all(scripts.map(async (response) => {
        const sizes = await response.request().sizes()
        return {
          url: new URL(response.url()).pathname,
          encoding: response.headers()['content-encoding'] ?? 'identity',
          bytes: sizes.responseBodySize,
          code: (await response.body()).toString('utf8'),
        }
      }))
      const total = rows.reduce((sum, row) => sum + row.bytes, 0)
      console.log(`sign-in page: ${rows.length} scripts, ${total} bytes transferred (budget ${SIGN_IN_SCRIPT_BUDGET})\n`
        + rows.map(row => `  ${row.bytes}\t${row.encoding}\t${row.url}`).join('\n'))

      expect(rows.length).toBeGreaterThan(0)
      expect(rows.filter(row => row.encoding !== 'br' && row.bytes >= SMALLEST_COMPRESSED).map(row => row.url)).toEqual([])
      expect(total).toBeLessThanOrEqual(SIGN_IN_SCRIPT_BUDGET)

      // The form libraries load with the page that uses them, in chunks of their own, not in the entry
      // every page waits for.
      const entryPath = new URL(await page.locator('script[type="module"][src]').first().getAttribute('src') ?? '', page.url()).pathname
      const entry = rows.find(row => row.url === entryPath)
      expect(entry).toBeDefined()
      for (const [library, marker] of Object.entries(FORM_LIBRARIES)) {
        expect(rows.some(row => row.code.includes(marker)), `${library} is loaded`).toBe(true)
        expect(entry!.code.includes(marker), `${library} is in the entry chunk`).toBe(false)
      }
      // The table library belongs to the lists behind sign-in.
      expect(rows.filter(row => row.code.includes('getCoreRowModel')).map(row => row.url)).toEqual([])
    }
    finally {
      await page.close()
    }
  })

  it('serves the gzip copy of a script to a client that accepts only gzip, and the plain file to one that accepts neither', async () => {
    const html = await (await fetch(new URL('/login', inject('baseUrl')))).text()
    const entry = new URL(/<script[^>]+type="module"[^>]+src="([^"]+)"/.exec(html)?.[1] ?? '', inject('baseUrl'))
    const gzip = await fetch(entry, { headers: { 'accept-encoding': 'gzip' } })
    const plain = await fetch(entry, { headers: { 'accept-encoding': 'identity' } })
    expect(gzip.headers.get('content-encoding')).toBe('gzip')
    expect(plain.headers.get('content-encoding')).toBeNull()
    // The same script either way (fetch undoes the gzip).
    expect(await gzip.text()).toBe(await plain.text())
  })
})
