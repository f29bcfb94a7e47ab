import type { H3Event } from 'h3'

/**
 * The site's address without a trailing slash: the public address (`NUXT_PUBLIC_URL`) when set,
 * otherwise the address this request came in on. For the robots file and the sitemap.
 */
export function siteUrl(event: H3Event): string {
  const configured = String(useRuntimeConfig(event).publicUrl ?? '').replace(/\/+$/, '')
  return configured || getRequestURL(event).origin
}
