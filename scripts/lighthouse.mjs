// `npm run lighthouse [-- <url>]`: Lighthouse (mobile, simulated slow 4G and a mid-range phone's CPU)
// against the public page of a running server (default http://localhost:3000/), through this
// machine's Chromium (CHROME_PATH, default /usr/bin/chromium). Prints the four category scores and
// the paint and blocking figures. Downloads nothing; not part of `npm test`.
import * as chromeLauncher from 'chrome-launcher'
import lighthouse from 'lighthouse'

const url = process.argv[2] ?? process.env.LIGHTHOUSE_URL ?? 'http://localhost:3000/'
const chromePath = process.env.CHROME_PATH || '/usr/bin/chromium'

const chrome = await chromeLauncher.launch({
  chromePath,
  chromeFlags: ['--headless=new', '--no-sandbox', '--disable-gpu', '--disable-background-networking',
    '--disable-component-update', '--disable-sync', '--no-first-run'],
})
try {
  // The default config is the mobile one: a 412 × 823 screen, simulated throttling.
  const result = await lighthouse(url, {
    port: chrome.port,
    output: 'json',
    logLevel: 'error',
    onlyCategories: ['performance', 'accessibility', 'best-practices', 'seo'],
  })
  if (!result) throw new Error('Lighthouse returned nothing')
  const { categories, audits, runtimeError } = result.lhr
  if (runtimeError) throw new Error(`${runtimeError.code}: ${runtimeError.message}`)
  console.log(`Lighthouse ${result.lhr.lighthouseVersion}, mobile, ${url}`)
  for (const key of ['performance', 'accessibility', 'best-practices', 'seo']) {
    console.log(`  ${categories[key].title.padEnd(16)} ${Math.round(categories[key].score * 100)}`)
  }
  for (const [id, label] of [['first-contentful-paint', 'FCP'], ['largest-contentful-paint', 'LCP'], ['total-blocking-time', 'TBT'], ['cumulative-layout-shift', 'CLS']]) {
    console.log(`  ${label.padEnd(16)} ${audits[id].displayValue}`)
  }
  // What cost points, so a low score says where to look.
  const failed = Object.values(result.lhr.categories).flatMap(c => c.auditRefs)
    .map(ref => audits[ref.id]).filter(a => a && a.score !== null && a.score < 0.9 && a.scoreDisplayMode !== 'informative' && a.scoreDisplayMode !== 'notApplicable')
  if (failed.length) console.log(`  below 90: ${[...new Set(failed.map(a => a.id))].join(', ')}`)
  // The scripts that kept the main thread busiest (the usual cause of blocking time).
  for (const item of (audits['bootup-time'].details?.items ?? []).slice(0, 3)) {
    console.log(`  script ${String(item.url).replace(/^https?:\/\/[^/]+/, '')}: ${Math.round(item.total)} ms (${Math.round(item.scripting)} ms scripting)`)
  }
}
finally {
  await chrome.kill()
}
