// Renders the app's icons for the fill page's web app manifest from public/favicon.svg with Debian's
// Chromium (playwright-core): public/icons/hoopwise-192.png, -512.png and a maskable 512 (the mark
// inside the safe zone on the club's green). Run by hand when the mark changes; the PNGs are committed.
import { readFileSync } from 'node:fs'
import { chromium } from 'playwright-core'

const svg = readFileSync('public/favicon.svg', 'utf8')
const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'] })
try {
  const page = await browser.newPage()
  for (const [name, size, maskable] of [['hoopwise-192', 192, false], ['hoopwise-512', 512, false], ['hoopwise-maskable-512', 512, true]]) {
    await page.setViewportSize({ width: size, height: size })
    // A maskable icon is cropped to a circle of 80 %: the mark sits at 60 % on a full green square.
    const inner = maskable ? Math.round(size * 0.6) : size
    await page.setContent(`<html><body style="margin:0;background:${maskable ? '#1f5a4b' : 'transparent'};display:grid;place-items:center;width:${size}px;height:${size}px">
      <div style="width:${inner}px;height:${inner}px">${svg.replace('<svg ', `<svg width="${inner}" height="${inner}" `)}</div></body></html>`)
    await page.screenshot({ path: `public/icons/${name}.png`, omitBackground: !maskable })
  }
}
finally {
  await browser.close()
}
