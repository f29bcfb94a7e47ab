#!/usr/bin/env node
// The fill page's weight (`npm run bench:fill-page`): starts the built server on a scratch database
// with the demo club, signs the demo admin in, opens /events/<id>/fill in a fresh Chromium profile
// (playwright-core, Debian's Chromium, Accept-Encoding br/gzip as a browser sends it) and sums the bytes
// transferred (compressed, as served from the .br/.gz beside each asset) for every JavaScript response
// of that first load, and for every response. The limit: at most 150 KB of JavaScript.
// BENCH_REUSE_BUILD=1 skips `nuxt build` when a build exists.
import { chromium } from 'playwright-core'
import { TEST } from './lib/config.mjs'
import { ensureBuild, signInDemoAdmin, startBenchStack } from './lib/bench.mjs'

const LIMIT = 150 * 1024
const CHROMIUM_ARGS = ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run']

ensureBuild({ rebuild: process.env.BENCH_REUSE_BUILD !== '1' })
const stack = await startBenchStack({ name: 'bench-fill-page', pgPort: TEST.spareBase + 16, appPort: TEST.spareBase + 17, smtpPort: TEST.spareBase + 18, members: 0 })
let browser
try {
  const { rows: [event] } = await stack.client.query('SELECT id FROM launch_events ORDER BY held_on DESC LIMIT 1')
  const eventId = event?.id ?? '00000000-0000-4000-8000-000000000000'
  const cookie = await signInDemoAdmin(stack.baseUrl)
  const [name, value] = [cookie.slice(0, cookie.indexOf('=')), cookie.slice(cookie.indexOf('=') + 1)]
  browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: CHROMIUM_ARGS })
  const context = await browser.newContext({ viewport: { width: 360, height: 740 }, isMobile: true })
  await context.addCookies([{ name, value, url: stack.baseUrl }])
  const page = await context.newPage()
  const responses = []
  page.on('response', r => responses.push(r))
  await page.goto(`${stack.baseUrl}/events/${eventId}/fill`)
  await page.waitForLoadState('networkidle')
  const rows = await Promise.all(responses.map(async (r) => {
    const sizes = await r.request().sizes().catch(() => ({ responseBodySize: 0, responseHeadersSize: 0 }))
    return {
      url: new URL(r.url()).pathname,
      script: /javascript/.test(r.headers()['content-type'] ?? ''),
      encoding: r.headers()['content-encoding'] ?? 'identity',
      bytes: sizes.responseBodySize,
    }
  }))
  // A script asked twice (a preload, then the import) is transferred once; the second answer reports no size.
  const once = new Map()
  for (const r of rows) if (!once.has(r.url) || once.get(r.url).bytes < r.bytes) once.set(r.url, { ...r, bytes: Math.max(0, r.bytes) })
  rows.splice(0, rows.length, ...once.values())
  const scripts = rows.filter(r => r.script)
  const js = scripts.reduce((s, r) => s + r.bytes, 0)
  const all = rows.reduce((s, r) => s + r.bytes, 0)
  console.log(scripts.map(r => `  ${r.bytes}\t${r.encoding}\t${r.url}`).join('\n'))
  console.log(`fill page, first load: ${scripts.length} scripts, ${(js / 1024).toFixed(1)} KB of JavaScript (limit ${LIMIT / 1024} KB); ${rows.length} responses, ${(all / 1024).toFixed(1)} KB in all`)
  process.exitCode = js <= LIMIT ? 0 : 1
}
finally {
  await browser?.close()
  await stack.stop()
}
