import { sitemapXml } from '#shared/utils/front-door'

/** The sitemap of the public pages (the page at `/`, sign-up, sign-in, the calculator, the glossary). */
export default defineEventHandler((event) => {
  setResponseHeader(event, 'content-type', 'application/xml; charset=utf-8')
  setResponseHeader(event, 'cache-control', 'public, max-age=3600')
  return sitemapXml(siteUrl(event))
})
