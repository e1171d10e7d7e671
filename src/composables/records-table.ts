import { type ComputedRef, computed } from 'vue'
import type { ArchivableTableBinding, RecordsTableBinding } from '@/components/records/records-table'
import type { TableOptions } from '@/stores/record-list'

/** What a list store built on useRecordList (stores/record-list.ts) holds and does, as a table needs it. */
export interface RecordListState<T, F extends object> {
  items: T[]
  total: number
  isLoading: boolean
  options: TableOptions
  search: string
  filters: F
  setOptions(next: TableOptions): Promise<void>
  setSearch(q: string): Promise<void>
  setFilters(patch: Partial<F>): Promise<void>
}

/** A list store's rows and paging for a table of records, with its events wired back to the store: `v-bind` it on the table. */
export function useRecordsTable<T>(list: RecordListState<T, object>): ComputedRef<RecordsTableBinding<T>> {
  return computed(() => ({
    items: list.items,
    itemsLength: list.total,
    loading: list.isLoading,
    options: list.options,
    search: list.search,
    'onUpdate:options': list.setOptions,
    'onUpdate:search': list.setSearch,
  }))
}

/** The same for records that can be archived, the switch showing the store's `archived` filter. */
export function useArchivableTable<T>(list: RecordListState<T, { archived: boolean }>): ComputedRef<ArchivableTableBinding<T>> {
  const table = useRecordsTable(list)
  return computed(() => ({
    ...table.value,
    archived: list.filters.archived,
    'onUpdate:archived': (archived: boolean) => void list.setFilters({ archived }),
  }))
}
