import { describe, it, expect } from 'vitest'
import { FINDABLE_PAGES, passTokenFrom, robotsTxt, sitemapXml } from '../../../shared/utils/front-door'
import { FrontDoorSchema, FRONT_DOOR_SECTIONS } from '../../../shared/schemas/club'

const TOKEN = 'AbCdEfGhIjKlMnOpQrStUvWxYz0123456789_-abcd'

describe('passTokenFrom: what the range table types or pastes', () => {
  it.each([
    [TOKEN, TOKEN],
    [`  ${TOKEN}  `, TOKEN],
    [`https://club.example/verify/${TOKEN}`, TOKEN],
    [`http://localhost:3000/verify/${TOKEN}?x=1#top`, TOKEN],
    ['', null],
    ['short', null],
    ['https://club.example/members', null],
    [`${TOKEN}/../../members`, null],
    ['<script>alert(1)</script>', null],
  ])('%j → %j', (text, expected) => {
    expect(passTokenFrom(text)).toBe(expected)
  })
})

describe('robots file and sitemap', () => {
  it('the robots file allows the findable pages and disallows the rest', () => {
    const text = robotsTxt('https://club.example')
    expect(text).toContain('Allow: /$')
    for (const p of FINDABLE_PAGES.filter(p => p !== '/')) expect(text).toContain(`Allow: ${p}\n`)
    expect(text).toContain('Disallow: /\n')
    expect(text).toContain('Sitemap: https://club.example/sitemap.xml')
  })

  it('the sitemap escapes its addresses', () => {
    expect(sitemapXml('https://club.example/a&b')).toContain('<loc>https://club.example/a&amp;b/signup</loc>')
  })
})

describe('FrontDoorSchema', () => {
  const valid = { name: 'Salt Marsh Rocketry', description: 'We fly.\nCome along.', meetsWhere: '', meetsWhen: '', joiningNote: '', show: Object.fromEntries(FRONT_DOOR_SECTIONS.map(s => [s, true])) }
  it('takes line breaks in texts and trims them', () => {
    expect(FrontDoorSchema.parse({ ...valid, description: '  We fly.\nCome along.  ' }).description).toBe('We fly.\nCome along.')
  })
  it.each([
    ['a missing section switch', { show: { dues: true } }],
    ['a bidirectional override', { description: 'abc\u202Edef' }],
    ['a name over 120 characters', { name: 'x'.repeat(121) }],
  ])('refuses %s', (_, change) => {
    expect(FrontDoorSchema.safeParse({ ...valid, ...change }).success).toBe(false)
  })
})
