import { MemberDirectoryQuerySchema, type MemberDirectoryQuery } from '~~/shared/schemas/member'

export type MemberFilters = MemberDirectoryQuery

/**
 * The member directory's filters, held in the URL query: the address of a view can be shared, and
 * back/forward walks through earlier views. `update` goes back to page 1 unless it sets the page.
 */
export function useMemberFilters() {
  const route = useRoute()
  const router = useRouter()
  const filters = computed(() => readQueryFilters(MemberDirectoryQuerySchema, route.query))
  /** The query sent to GET /api/members (the same short form as the URL). */
  const apiQuery = computed(() => writeQueryFilters(MemberDirectoryQuerySchema, filters.value))
  const active = computed(() => !!(filters.value.q || filters.value.status || filters.value.role))

  function update(patch: Partial<MemberFilters>) {
    const next = { ...filters.value, ...patch }
    if (!('page' in patch)) next.page = 1
    return router.replace({ query: writeQueryFilters(MemberDirectoryQuerySchema, next) })
  }
  function reset() {
    return router.replace({ query: {} })
  }
  /** Moves a page past the end of `total` rows (an old link, a list that shrank) to the last page. */
  function keepPageInRange(total: number) {
    const page = clampPage(filters.value.page, total, filters.value.pageSize)
    return page === filters.value.page ? undefined : update({ page })
  }
  return { filters, apiQuery, active, update, reset, keepPageInRange }
}
