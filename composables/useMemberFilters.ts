import type { LocationQuery } from 'vue-router'
import { MemberDirectoryQuerySchema, type MemberDirectoryQuery } from '~~/shared/schemas/member'

export type MemberFilters = MemberDirectoryQuery
type FilterKey = keyof MemberFilters

const DEFAULTS: MemberFilters = MemberDirectoryQuerySchema.parse({})
const KEYS = Object.keys(MemberDirectoryQuerySchema.shape) as FilterKey[]

/** Reads the filters from a route query key by key: a bad value falls back to its default alone. */
function fromQuery(query: LocationQuery): MemberFilters {
  const out: Record<string, unknown> = { ...DEFAULTS }
  for (const key of KEYS) {
    const raw = query[key]
    if (typeof raw !== 'string' || raw === '') continue
    const parsed = MemberDirectoryQuerySchema.shape[key].safeParse(raw)
    if (parsed.success) out[key] = parsed.data
  }
  return out as MemberFilters
}

/** The filters as a short query: defaults and empty values are left out, so URLs stay readable. */
function toQuery(filters: MemberFilters): Record<string, string> {
  const query: Record<string, string> = {}
  for (const key of KEYS) {
    const value = filters[key]
    if (value === undefined || value === '' || value === DEFAULTS[key]) continue
    query[key] = String(value)
  }
  return query
}

/**
 * The member directory's filters, held in the URL query: the address of a view can be shared, and
 * back/forward walks through earlier views. `update` goes back to page 1 unless it sets the page.
 */
export function useMemberFilters() {
  const route = useRoute()
  const router = useRouter()
  const filters = computed(() => fromQuery(route.query))
  /** The query sent to GET /api/members (the same short form as the URL). */
  const apiQuery = computed(() => toQuery(filters.value))
  const active = computed(() => !!(filters.value.q || filters.value.status || filters.value.role))

  function update(patch: Partial<MemberFilters>) {
    const next = { ...filters.value, ...patch }
    if (!('page' in patch)) next.page = 1
    return router.replace({ query: toQuery(next) })
  }
  function reset() {
    return router.replace({ query: {} })
  }
  return { filters, apiQuery, active, update, reset }
}
