/**
 * Fill-pass pages (`/verify/<token>`) and their API answer tell search engines not to index them
 * (`X-Robots-Tag: noindex`): a member's name and tiers are shown to whoever holds the code, never to
 * a search. Set before the handler runs, so refusals carry it too.
 */
const NOINDEX_PREFIXES = ['/verify/', '/api/verify/'] as const

export default defineEventHandler((event) => {
  const path = event.path.split('?')[0]!
  if (NOINDEX_PREFIXES.some(prefix => path.startsWith(prefix))) setResponseHeader(event, 'x-robots-tag', 'noindex, nofollow')
})
