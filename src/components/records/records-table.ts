import type { TableOptions } from '@/stores/record-list'

/**
 * What a page hands a table of workshop records (CustomersTable, JobsTable…), passed on to
 * RecordsTable as it is: one server page of rows, how it was asked for, and the table's events,
 * declared as `on…` props so a wrapper forwards them without re-emitting each one.
 */
export interface RecordsTableBinding<T> {
  items: T[]
  itemsLength: number
  loading: boolean
  options: TableOptions
  search: string
  'onUpdate:options'?: (options: TableOptions) => void
  'onUpdate:search'?: (search: string) => void
  onOpen?: (item: T) => void
}

/** The same for records that can be archived, whose table has the "Show archived" switch. */
export interface ArchivableTableBinding<T> extends RecordsTableBinding<T> {
  archived: boolean
  'onUpdate:archived'?: (archived: boolean) => void
}
