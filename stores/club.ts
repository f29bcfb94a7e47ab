import { defineStore } from 'pinia'
import type { StandingDto } from '~~/shared/types/members'

/**
 * The signed-in member's club as the interface needs it everywhere: its time zone, so every instant
 * is shown as the club reads its clock. Loaded once from GET /api/me/standing per club (the request made
 * while rendering on the server travels to the browser with the page).
 */
export const useClubStore = defineStore('club', () => {
  const clubId = ref<string | null>(null)
  const timeZone = ref<string | null>(null)
  let loading: Promise<void> | null = null

  /** Loads the club of `forClubId` unless it is already here; `fetcher` forwards the cookie on the server. */
  function load(forClubId: string, fetcher: typeof $fetch = $fetch): Promise<void> {
    if (clubId.value === forClubId && timeZone.value) return Promise.resolve()
    loading ??= fetcher<StandingDto>('/api/me/standing')
      .then((me) => {
        clubId.value = me.club.id
        timeZone.value = me.club.timeZone
      })
      .catch(() => {
        // Times stay in UTC, labelled so, until the next try.
      })
      .finally(() => {
        loading = null
      })
    return loading
  }

  return { clubId, timeZone, load }
})
