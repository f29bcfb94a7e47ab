import { defineStore } from 'pinia'
import { rolesCan, type Capability } from '~~/shared/utils/permissions'

/** A thin wrapper over useUserSession(): who is signed in and what the interface may offer them. */
export const useSessionStore = defineStore('session', () => {
  const { user, loggedIn, fetch, clear } = useUserSession()
  const roles = computed(() => user.value?.roles ?? [])
  /** Shapes the interface only; the server checks every request itself. */
  function can(capability: Capability): boolean {
    return rolesCan(roles.value, capability)
  }
  async function signOut() {
    await $fetch('/api/auth/logout', { method: 'POST' })
    await clear()
    await navigateTo('/login')
  }
  return { user, loggedIn, roles, can, refresh: fetch, signOut }
})
