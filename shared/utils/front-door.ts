/**
 * The public side of the site: which pages are public and findable, the robots file and sitemap
 * built from that one list, and the fill-pass check's reading of a typed or pasted pass.
 */

/** The pages a search engine may list, in the sitemap's order (the fill-pass pages are public but never listed). */
export const FINDABLE_PAGES = ['/', '/signup', '/login', '/calculator', '/glossary'] as const

/** Assets the findable pages need to render (a crawler that renders may fetch them). */
const RENDER_ASSETS = ['/_nuxt/', '/favicon.svg', '/og-image.png']

/**
 * The robots file: everything is disallowed but the findable pages (`/` exactly, the others by
 * prefix) and the assets they render with, and the sitemap's address. Crawlers take the longest
 * matching rule, so each `Allow` wins over the general `Disallow: /`.
 */
export function robotsTxt(baseUrl: string): string {
  const allow = FINDABLE_PAGES.map(p => (p === '/' ? '/$' : p))
  return [
    'User-agent: *',
    ...[...allow, ...RENDER_ASSETS].map(p => `Allow: ${p}`),
    'Disallow: /',
    '',
    `Sitemap: ${baseUrl}/sitemap.xml`,
    '',
  ].join('\n')
}

/** XML text with its five special characters escaped. */
function xmlEscape(text: string): string {
  return text.replace(/[<>&'"]/g, c => ({ '<': '&lt;', '>': '&gt;', '&': '&amp;', '\'': '&apos;', '"': '&quot;' })[c]!)
}

/** The sitemap (sitemaps.org 0.9) of the findable pages on `baseUrl` (no trailing slash). */
export function sitemapXml(baseUrl: string): string {
  const urls = FINDABLE_PAGES.map(p => `  <url><loc>${xmlEscape(`${baseUrl}${p}`)}</loc></url>`)
  return ['<?xml version="1.0" encoding="UTF-8"?>', '<urlset xmlns="http://www.sitemaps.org/schemas/sitemap/0.9">', ...urls, '</urlset>', ''].join('\n')
}

/**
 * The fill-pass token in what someone typed or pasted at the range table: the pass's whole address
 * (…/verify/<token>, as its QR code holds it) or the token alone. Null when it holds no token shape
 * (43 base64url characters are issued; the check allows a little either way and lets the server judge).
 */
export function passTokenFrom(text: string): string | null {
  const trimmed = text.trim()
  const afterVerify = trimmed.match(/\/verify\/([^/?#\s]+)/)?.[1] ?? trimmed
  return /^[\w-]{16,200}$/.test(afterVerify) ? afterVerify : null
}
