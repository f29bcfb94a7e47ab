/** What a public page says about itself to search engines and link previews. */
export interface PageSeo {
  title: string
  description: string
  /** The page's own path, for og:url (only when the site's public address is configured). */
  path?: string
}

/**
 * Title, description and Open Graph tags of a public page, rendered on the server. og:url is the
 * page on the site's public address (`NUXT_PUBLIC_URL`) and only set when that is known; og:image is
 * the app's own picture. Getter values keep the tags in step with data that loads later.
 */
export function usePageSeo(seo: () => PageSeo): void {
  const base = String(useRuntimeConfig().public.url ?? '').replace(/\/+$/, '')
  const origin = base || useRequestURL().origin
  useSeoMeta({
    title: () => seo().title,
    description: () => seo().description,
    ogTitle: () => seo().title,
    ogDescription: () => seo().description,
    ogType: 'website',
    ogSiteName: 'Hoopwise',
    ogUrl: () => (base && seo().path ? `${base}${seo().path}` : undefined),
    ogImage: `${origin}/og-image.png`,
    ogImageAlt: 'Hoopwise: a water rocketry club\'s office',
    twitterCard: 'summary_large_image',
  })
}
