#!/usr/bin/env node
// Screenshots of a running Hoopwise (npm start) for the README and for looking at the product:
//   node scripts/screenshots.mjs [baseUrl] [outDir]
// Signs in with the demo accounts and captures the main screens at desktop and phone widths.
import { mkdirSync } from 'node:fs'
import { join } from 'node:path'
import { chromium } from 'playwright-core'
import { ROOT } from './lib/config.mjs'

const baseUrl = process.argv[2] ?? 'http://localhost:3000'
const outDir = process.argv[3] ?? join(ROOT, 'docs', 'screenshots')
const ARGS = ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run']

const SHOTS = [
  { who: 'admin@hoopwise.example', path: '/', name: 'dashboard' },
  { who: 'admin@hoopwise.example', path: '/members', name: 'members' },
  { who: 'admin@hoopwise.example', path: '/outbox', name: 'outbox' },
  { who: 'safety@hoopwise.example', path: '/audit', name: 'audit' },
  { who: 'safety@hoopwise.example', path: '/waiver', name: 'waiver' },
  { who: 'member@hoopwise.example', path: '/standing', name: 'standing' },
  { who: 'member@hoopwise.example', path: '/profile', name: 'profile' },
  { who: 'member@hoopwise.example', path: '/glossary', name: 'glossary' },
  { who: 'member@hoopwise.example', path: '/calculator', name: 'calculator' },
  { who: 'member@hoopwise.example', path: '/vessels/SRG-0001', name: 'vessel' },
  { who: 'safety@hoopwise.example', path: '/vessels', name: 'vessels' },
  { who: 'member@hoopwise.example', path: '/coupons', name: 'coupons' },
  { who: 'member@hoopwise.example', path: '/training', name: 'training' },
  { who: 'member@hoopwise.example', path: '/workshop', name: 'workshop' },
  { who: 'admin@hoopwise.example', path: '/dues/payments', name: 'payments' },
  { who: 'safety@hoopwise.example', path: '/tiers', name: 'tiers' },
  { who: 'member@hoopwise.example', path: '/events', name: 'events' },
  { who: 'safety@hoopwise.example', path: '/fill-stations', name: 'fill-stations' },
  { who: 'member@hoopwise.example', path: '/fill-pass', name: 'fill-pass' },
  { who: 'member@hoopwise.example', path: '/fills', name: 'fills' },
  { who: 'safety@hoopwise.example', path: '/audit/desk', name: 'audit-desk' },
  { who: 'safety@hoopwise.example', path: '/incidents', name: 'incidents' },
  { who: 'member@hoopwise.example', path: '/incidents/new', name: 'incident-new' },
  { who: 'admin@hoopwise.example', path: '/members/import', name: 'members-import' },
  { who: 'instructor@hoopwise.example', path: '/imported-records', name: 'imported-records' },
]

mkdirSync(outDir, { recursive: true })
const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ARGS })
try {
  for (const viewport of [{ width: 1280, height: 860, suffix: '' }, { width: 360, height: 740, suffix: '-phone' }]) {
    const contexts = new Map()
    for (const shot of SHOTS) {
      if (!contexts.has(shot.who)) {
        const context = await browser.newContext({ viewport })
        const page = await context.newPage()
        await page.goto(`${baseUrl}/login`)
        // A function, not a string: the page's CSP forbids eval, which a string predicate needs.
        await page.waitForFunction(() => window.useNuxtApp?.().isHydrating === false)
        await page.getByTestId('field-email').fill(shot.who)
        await page.getByTestId('field-password').fill('hoopwise-demo')
        await page.getByTestId('login-submit').click()
        await page.waitForURL(url => url.pathname === '/')
        contexts.set(shot.who, page)
      }
      const page = contexts.get(shot.who)
      await page.goto(`${baseUrl}${shot.path}`)
      await page.waitForLoadState('networkidle')
      const file = join(outDir, `${shot.name}${viewport.suffix}.png`)
      await page.screenshot({ path: file, fullPage: viewport.suffix === '' })
      console.log(`• ${file}`)
    }
    for (const page of contexts.values()) await page.context().close()
  }
}
finally {
  await browser.close()
}
