/**
 * The signed-in member's club time zone (an IANA name such as "Europe/London"), or null until it
 * is known. Every instant on screen is shown in it, whatever the viewer's own clock says. The
 * first caller loads it once (during server rendering when there is one, so the page arrives with
 * the club's times already); later callers share the store.
 */
export function useClubTimeZone() {
  const club = useClubStore()
  const { user } = useUserSession()
  const fetcher = useRequestFetch()
  const load = () => (user.value?.clubId ? club.load(user.value.clubId, fetcher as typeof $fetch) : Promise.resolve())
  if (getCurrentInstance()) {
    if (import.meta.server) onServerPrefetch(load)
    else onMounted(load)
  }
  return computed(() => (club.clubId === user.value?.clubId ? club.timeZone : null))
}
