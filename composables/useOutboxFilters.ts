import { OutboxQuerySchema, type OutboxQuery } from '~~/shared/schemas/notice'

export type OutboxFilters = OutboxQuery

/**
 * The outbox's view (status, kind, page, page size) held in the URL query, like the member
 * directory's: the dashboard can link to `/outbox?status=failed`, and a view can be shared.
 * `update` goes back to page 1 unless it sets the page.
 */
export function useOutboxFilters() {
  const route = useRoute()
  const router = useRouter()
  const filters = computed(() => readQueryFilters(OutboxQuerySchema, route.query))
  /** The query sent to GET /api/outbox (the same short form as the URL). */
  const apiQuery = computed(() => writeQueryFilters(OutboxQuerySchema, filters.value))
  const active = computed(() => !!(filters.value.status || filters.value.kind))

  function update(patch: Partial<OutboxFilters>) {
    const next = { ...filters.value, ...patch }
    if (!('page' in patch)) next.page = 1
    return router.replace({ query: writeQueryFilters(OutboxQuerySchema, next) })
  }
  /** Moves a page past the end of `total` notices to the last page. */
  function keepPageInRange(total: number) {
    const page = clampPage(filters.value.page, total, filters.value.pageSize)
    return page === filters.value.page ? undefined : update({ page })
  }
  return { filters, apiQuery, active, update, keepPageInRange }
}
