import type { StandingDto } from '~~/shared/types/members'

/**
 * The units store set from the signed-in member's own preference (their standing, shared with the
 * profile page under one key), so pressures show in the member's unit even on a page opened first.
 */
export function useUnitPreference() {
  const units = useUnitsStore()
  const { data } = useFetch<StandingDto>('/api/me/standing', { key: 'me:standing' })
  watchEffect(() => {
    if (data.value) units.setPreference(data.value.member.unitPreference)
  })
  return units
}
