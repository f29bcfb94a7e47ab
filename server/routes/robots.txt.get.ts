import { robotsTxt } from '#shared/utils/front-door'

/** The robots file: only the public pages may be crawled; it names the sitemap. */
export default defineEventHandler((event) => {
  setResponseHeader(event, 'content-type', 'text/plain; charset=utf-8')
  setResponseHeader(event, 'cache-control', 'public, max-age=3600')
  return robotsTxt(siteUrl(event))
})
