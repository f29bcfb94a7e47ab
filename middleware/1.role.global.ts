import type { Capability } from '~~/shared/utils/permissions'

declare module '#app' {
  interface PageMeta {
    /** The capability a page needs; members without it are sent to their dashboard. */
    can?: Capability
    /** Pages open to visitors who are not signed in. */
    public?: boolean
  }
}

/**
 * Shapes navigation only: pages ask for sign-in unless marked public, and pages that name a
 * capability turn away members who lack it. The server enforces the same rules on every route.
 */
export default defineNuxtRouteMiddleware((to) => {
  const { loggedIn } = useUserSession()
  if (to.meta.public) return
  if (!loggedIn.value) return navigateTo({ path: '/login', query: to.fullPath === '/' ? {} : { next: to.fullPath } })
  const capability = to.meta.can
  if (capability && !useSessionStore().can(capability)) {
    return navigateTo({ path: '/', query: { denied: to.path } })
  }
})
