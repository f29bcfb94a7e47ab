// What search engines are told: the robots file, the sitemap of the public pages, the title,
// description and Open Graph tags of each public page, and noindex on every fill-pass answer.
import { describe, it, expect, inject } from 'vitest'
import robotsParser from 'robots-parser'
import { FINDABLE_PAGES } from '../../../shared/utils/front-door'

const base = () => inject('baseUrl') as string
const get = (path: string) => fetch(new URL(path, base()))

describe('GET /robots.txt', () => {
  it('lets crawlers reach only the public pages and names the sitemap', async () => {
    const res = await get('/robots.txt')
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toMatch(/^text\/plain/)
    const text = await res.text()
    // The test server's public address is its own (NUXT_PUBLIC_URL).
    expect(text).toContain(`Sitemap: ${base()}/sitemap.xml`)
    // Read as a crawler reads it (the parser Lighthouse uses too).
    const robots = robotsParser(`${base()}/robots.txt`, text)
    for (const path of FINDABLE_PAGES) expect(robots.isAllowed(`${base()}${path}`, 'AnyBot'), path).toBe(true)
    for (const path of ['/members', '/members/1', '/standing', '/audit', '/verify/abc', '/api/front-door', '/events/1/fill', '/dues/payments', '/public-page', '/fill-pass']) {
      expect(robots.isAllowed(`${base()}${path}`, 'AnyBot'), path).toBe(false)
    }
    expect(robots.isAllowed(`${base()}/_nuxt/entry.js`, 'AnyBot')).toBe(true)
  })
})

describe('GET /sitemap.xml', () => {
  it('lists exactly the findable public pages on the public address', async () => {
    const res = await get('/sitemap.xml')
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toMatch(/xml/)
    const xml = await res.text()
    expect(xml).toMatch(/^<\?xml version="1.0" encoding="UTF-8"\?>\n<urlset xmlns="http:\/\/www.sitemaps.org\/schemas\/sitemap\/0.9">/)
    const locs = [...xml.matchAll(/<loc>([^<]+)<\/loc>/g)].map(m => m[1])
    expect(locs).toEqual(FINDABLE_PAGES.map(p => `${base()}${p}`))
    expect(xml).not.toMatch(/verify|members|standing/)
  })
})

describe('each public page says what it is', () => {
  it.each([
    ['/', /water rocketry club/],
    ['/signup', /Join the club/],
    ['/login', /Sign in/],
    ['/calculator', /Air-charge calculator/],
    ['/glossary', /Words we use/],
  ])('%s has a title, a description and Open Graph tags, server-rendered', async (path, title) => {
    const res = await get(path)
    expect(res.status).toBe(200)
    const html = await res.text()
    expect(html.match(/<title>([^<]*)<\/title>/)?.[1]).toMatch(title)
    const meta = (attr: string, name: string) => html.match(new RegExp(`<meta ${attr}="${name}" content="([^"]*)"`))?.[1]
    expect(meta('name', 'description')?.length).toBeGreaterThan(20)
    expect(meta('property', 'og:title')).toMatch(title)
    expect(meta('property', 'og:description')?.length).toBeGreaterThan(20)
    expect(meta('property', 'og:type')).toBe('website')
    expect(meta('property', 'og:url')).toBe(`${base()}${path}`)
    expect(meta('property', 'og:image')).toBe(`${base()}/og-image.png`)
    // The app's description of itself is not repeated under the page's own.
    expect(html.match(/<meta name="description"/g)).toHaveLength(1)
    expect(res.headers.get('x-robots-tag')).toBeNull()
  })

  it('the Open Graph picture is served', async () => {
    const res = await get('/og-image.png')
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toBe('image/png')
  })
})

describe('fill-pass pages are never indexed', () => {
  it.each(['/verify/forged-token-that-is-not-a-pass', '/api/verify/forged-token-that-is-not-a-pass'])('%s answers with X-Robots-Tag: noindex', async (path) => {
    const res = await get(path)
    expect(res.status).toBe(404)
    expect(res.headers.get('x-robots-tag')).toMatch(/noindex/)
  })

  it('the page also carries a robots meta tag and no og:url', async () => {
    const html = await (await get('/verify/forged-token-that-is-not-a-pass')).text()
    expect(html).toMatch(/<meta name="robots" content="noindex, nofollow">/)
    expect(html).not.toMatch(/og:url/)
  })
})
