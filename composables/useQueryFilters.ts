import { computed, watch, type WatchSource } from 'vue'
import type { z } from 'zod'
import type { LocationQuery, LocationQueryRaw } from 'vue-router'
import { readQueryFilters, writeQueryFilters } from '~~/shared/utils/query-filters'
import { clampPage } from '~~/shared/utils/paging'

/** Keys of a list's query that choose a page or an order rather than filter the list. */
const VIEW_KEYS = new Set(['page', 'pageSize', 'sort', 'dir'])

/** The route and router a list reads and writes (the page's own unless a test passes its own). */
export interface QueryFiltersDeps {
  route: { query: LocationQuery }
  router: { replace: (to: { query: LocationQueryRaw }) => unknown }
}

/**
 * A list's view (filters, page, page size) held in the URL query and parsed with the list route's
 * own zod query schema, so an address can be shared, linked from elsewhere ("/outbox?status=failed")
 * and walked with back/forward. `update` goes back to page 1 unless it sets the page; `apiQuery` is
 * the same short form for the list's GET route; `followTotal` moves a page past the end (an old link,
 * a list that shrank) to the last page with rows.
 */
export function useQueryFilters<S extends z.ZodObject<z.ZodRawShape>>(schema: S, deps?: QueryFiltersDeps) {
  const route = deps?.route ?? useRoute()
  const router = deps?.router ?? useRouter()
  const filters = computed(() => readQueryFilters(schema, route.query))
  const apiQuery = computed(() => writeQueryFilters(schema, filters.value))
  /** True when any filter (not the page, page size or order) narrows the list. */
  const active = computed(() => Object.keys(apiQuery.value).some(key => !VIEW_KEYS.has(key)))

  function update(patch: Partial<z.infer<S>>) {
    const next: Record<string, unknown> = { ...filters.value, ...patch }
    if (!('page' in patch)) next.page = 1
    return router.replace({ query: writeQueryFilters(schema, next as Partial<z.infer<S>>) })
  }
  /** Back to the list's first, unfiltered view. */
  function reset() {
    return router.replace({ query: {} })
  }
  /** Moves a page past the end of `total` rows to the last page; nothing when it is in range. */
  function keepPageInRange(total: number) {
    const { page, pageSize } = filters.value as { page: number, pageSize: number }
    const last = clampPage(page, total, pageSize)
    return last === page ? undefined : update({ page: last } as Partial<z.infer<S>>)
  }
  /** Watches the list's total (in the browser) and keeps the page in range as it changes. */
  function followTotal(total: WatchSource<number | null | undefined>) {
    watch(total, (t) => {
      if (import.meta.client && typeof t === 'number') keepPageInRange(t)
    }, { immediate: true })
  }
  return { filters, apiQuery, active, update, reset, keepPageInRange, followTotal }
}
