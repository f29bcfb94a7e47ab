import {
  columnFilteringFeature, functionalUpdate, rowPaginationFeature, rowSortingFeature, tableFeatures, useTable,
  type ColumnDef, type ColumnFiltersState, type PaginationState, type RowData, type SortingState, type Updater,
} from '@tanstack/vue-table'

/** The table features a server-paged list uses; column helpers take its type (`ServerTableFeatures`). */
export const serverTableFeatures = tableFeatures({ rowSortingFeature, rowPaginationFeature, columnFilteringFeature })
export type ServerTableFeatures = typeof serverTableFeatures

/** What every server-paged list's query schema holds (its filters live in the URL: decision 0024). */
export interface ServerListFilters {
  sort: string
  dir: 'asc' | 'desc'
  page: number
  pageSize: number
}

/**
 * A headless @tanstack/vue-table whose sorting, paging and filtering the SERVER owns (manual*): header
 * clicks and pager moves become `update` patches of the list's filters, and the page fetches the rows
 * again. One sort column at a time, never "unsorted"; only `sortFields` the route accepts are sent.
 */
export function useServerTable<TData extends RowData & { id: string }, F extends ServerListFilters>(o: {
  columns: ColumnDef<ServerTableFeatures, TData>[]
  items: () => TData[]
  total: () => number
  filters: () => F
  sortFields: readonly string[]
  /** The filters that narrow columns, for the table's own state (ids of columns). */
  columnFilters?: () => ColumnFiltersState
  update: (patch: Partial<F>) => void
}) {
  const sorting = computed<SortingState>(() => [{ id: o.filters().sort, desc: o.filters().dir === 'desc' }])
  const pagination = computed<PaginationState>(() => ({ pageIndex: o.filters().page - 1, pageSize: o.filters().pageSize }))
  const columnFilters = computed<ColumnFiltersState>(() => o.columnFilters?.() ?? [])
  const table = useTable({
    features: serverTableFeatures,
    columns: o.columns,
    data: computed(o.items),
    state: computed(() => ({ sorting: sorting.value, pagination: pagination.value, columnFilters: columnFilters.value })),
    manualSorting: true,
    manualPagination: true,
    manualFiltering: true,
    autoResetPageIndex: false,
    enableSortingRemoval: false,
    enableMultiSort: false,
    rowCount: computed(o.total),
    getRowId: (row: TData) => row.id,
    onSortingChange: (updater: Updater<SortingState>) => {
      const [next] = functionalUpdate(updater, sorting.value)
      if (next && o.sortFields.includes(next.id)) o.update({ sort: next.id, dir: next.desc ? 'desc' : 'asc' } as Partial<F>)
    },
    onPaginationChange: (updater: Updater<PaginationState>) => {
      const next = functionalUpdate(updater, pagination.value)
      if (next.pageSize !== o.filters().pageSize) o.update({ pageSize: next.pageSize } as Partial<F>)
      else o.update({ page: next.pageIndex + 1 } as Partial<F>)
    },
  })
  /** On phones the rows stack without a header, so sorting gets a select: "field:dir" chosen there. */
  function chooseSort(value: string) {
    const [id, dir] = value.split(':')
    table.setSorting([{ id: id!, desc: dir === 'desc' }])
  }
  return { table, chooseSort }
}
