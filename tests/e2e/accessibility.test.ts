import { describe, expect, it } from 'vitest'
import { createPage } from '@nuxt/test-utils/e2e'
import { setupBrowser, goTo } from '../support/browser'
import { axeViolations, describeViolations } from '../support/axe'
import { api } from '../support/http'
import type { FillPassDto } from '../../shared/types/fill-passes'

await setupBrowser()

// The public pages, signed out, on a phone and on a desktop: axe finds no WCAG 2.2 AA violation.
describe('the public pages pass axe with no violations', () => {
  it.each([
    { width: 375, height: 800 },
    { width: 1280, height: 900 },
  ])('at $width × $height', async (viewport) => {
    const pass = await api<FillPassDto>('/api/me/fill-pass', { as: 'member' })
    expect(pass.status).toBe(200)
    const verifyPath = new URL(pass.body.verifyUrl).pathname
    const page = await createPage(undefined, { viewport })
    try {
      for (const path of ['/', '/signup', '/login', '/calculator', '/glossary', verifyPath, '/verify/not-a-real-pass-token-at-all']) {
        await goTo(page, path)
        const violations = await axeViolations(page)
        expect(violations, `${path}:\n${describeViolations(violations)}`).toEqual([])
      }
    }
    finally {
      await page.close()
    }
  })
})
