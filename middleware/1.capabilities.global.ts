import type { Capability } from '~~/shared/utils/permissions'
import { NAV_ITEMS } from '~/composables/useNavigation'

declare module '#app' {
  interface PageMeta {
    /** The capability a page needs; members without it are sent to their dashboard. */
    can?: Capability
    /** Pages open to visitors who are not signed in. */
    public?: boolean
    /** The launch-side fill page: it asks for sign-in itself once the server answers (offline it cannot). */
    field?: boolean
  }
}

/** The capability of the navigation section `path` falls in (/members/… → members.read), if any. */
function sectionCapability(path: string): Capability | undefined {
  return NAV_ITEMS.find(item => item.can && (path === item.to || path.startsWith(`${item.to}/`)))?.can
}

/**
 * Shapes navigation only: pages ask for sign-in unless marked public, and pages that name a
 * capability turn away members who lack it. The server enforces the same rules on every route.
 */
export default defineNuxtRouteMiddleware((to) => {
  const { loggedIn } = useUserSession()
  if (to.meta.public || to.meta.field) return
  if (!loggedIn.value) return navigateTo({ path: '/login', query: to.fullPath === '/' ? {} : { next: to.fullPath } })
  // A page's own `can` wins; otherwise the section's capability from the navigation table applies.
  const capability = to.meta.can ?? sectionCapability(to.path)
  if (capability && !useSessionStore().can(capability)) {
    return navigateTo({ path: '/', query: { denied: to.path } })
  }
})
