import { type Ref, ref } from 'vue'
import type { ApiError } from '@/api/http'
import type { ListParams } from '@/api/list-query'
import type { Page } from '@shared/schemas/common'
import { asApiError, reportFailure } from './report-failure'

/** One column the list is sorted by, as Vuetify's data tables describe it. */
export interface SortItem {
  key: string
  order?: boolean | 'asc' | 'desc'
}

/** What a server data table asks for; `update:options` carries more, which is ignored. */
export interface TableOptions {
  page: number
  itemsPerPage: number
  sortBy: SortItem[]
}

function sameOptions(a: TableOptions, b: TableOptions): boolean {
  return (
    a.page === b.page &&
    a.itemsPerPage === b.itemsPerPage &&
    a.sortBy.length === b.sortBy.length &&
    a.sortBy.every((s, i) => s.key === b.sortBy[i]?.key && s.order === b.sortBy[i]?.order)
  )
}

/**
 * The state behind one server-side paged, sorted and searched table, for use inside a setup store.
 * The store keeps it, so coming back from a record finds the list as it was left.
 */
export function useRecordList<T, F extends object, K extends string>(
  fetchPage: (params: ListParams<K> & F) => Promise<Page<T>>,
  initial: { options: TableOptions; filters: F; sortKeys: readonly K[] },
) {
  const items = ref([]) as Ref<T[]>
  const total = ref(0)
  const hasLoaded = ref(false)
  const isLoading = ref(false)
  const error = ref<ApiError | null>(null)
  const options = ref<TableOptions>({ ...initial.options, sortBy: [...initial.options.sortBy] })
  const search = ref('')
  const filters = ref({ ...initial.filters }) as Ref<F>
  let latest = 0

  const isSortKey = (key: string): key is K => (initial.sortKeys as readonly string[]).includes(key)

  function params(): ListParams<K> & F {
    const [sort] = options.value.sortBy
    const sortBy = sort && isSortKey(sort.key) ? sort.key : undefined
    return {
      ...filters.value,
      page: options.value.page,
      pageSize: options.value.itemsPerPage,
      sortBy,
      sortDesc: sortBy ? sort?.order === 'desc' : undefined,
      q: search.value || undefined,
    }
  }

  async function load(): Promise<void> {
    // Typing in the search sends a request per pause; only the newest answer may fill the table.
    const ticket = ++latest
    isLoading.value = true
    error.value = null
    try {
      const page = await fetchPage(params())
      if (ticket !== latest) return
      items.value = page.items
      total.value = page.total
      hasLoaded.value = true
    } catch (cause) {
      if (ticket === latest) error.value = reportFailure(cause)
    } finally {
      if (ticket === latest) isLoading.value = false
    }
  }

  /** For the table's `update:options`, which it also sends on mount and after the page is reset here. */
  function setOptions(next: TableOptions): Promise<void> {
    const wanted = { page: next.page, itemsPerPage: next.itemsPerPage, sortBy: next.sortBy.map((s) => ({ ...s })) }
    if (sameOptions(wanted, options.value)) return Promise.resolve()
    options.value = wanted
    return load()
  }

  function setSearch(q: string): Promise<void> {
    const text = q.trim()
    if (text === search.value) return Promise.resolve()
    search.value = text
    options.value = { ...options.value, page: 1 }
    return load()
  }

  function setFilters(patch: Partial<F>): Promise<void> {
    filters.value = { ...filters.value, ...patch }
    options.value = { ...options.value, page: 1 }
    return load()
  }

  return { items, total, hasLoaded, isLoading, error, options, search, filters, load, setOptions, setSearch, setFilters }
}

/**
 * Runs one call for a store action with its busy flag and error: a failure is kept in `error` (and
 * queued as a notification unless a form or dialog explains it, see report-failure.ts, or the
 * caller's page explains that status itself).
 */
export async function attempt(
  busy: Ref<boolean>,
  error: Ref<ApiError | null>,
  call: () => Promise<void>,
  explainedHere: readonly number[] = [],
): Promise<boolean> {
  busy.value = true
  error.value = null
  try {
    await call()
    return true
  } catch (cause) {
    const failure = asApiError(cause)
    error.value = explainedHere.includes(failure.status) ? failure : reportFailure(failure)
    return false
  } finally {
    busy.value = false
  }
}

export interface RecordApi<T, I> {
  get(id: string): Promise<T>
  create(input: I): Promise<T>
  update(id: string, input: I): Promise<T>
  remove(id: string): Promise<void>
  archive?(id: string): Promise<T>
  restore?(id: string): Promise<T>
  /** For pickers: the first matches for what was typed. */
  search?(q: string): Promise<T[]>
}

/**
 * The record a detail page shows, and saving, archiving and deleting it, for any workshop record.
 * `listItems` is the table's rows, kept in step so a change shows there without a reload.
 */
export function useRecordDetail<T extends { id: string }, I>(listItems: Ref<T[]>, api: RecordApi<T, I>) {
  const current = ref<T | null>(null) as Ref<T | null>
  const isLoadingCurrent = ref(false)
  const currentError = ref<ApiError | null>(null)
  const isSaving = ref(false)
  /** A 422 here carries the issues a form shows on its fields. */
  const saveError = ref<ApiError | null>(null)
  const isRemoving = ref(false)
  /** A 409 `in_use` here carries the message the delete dialog shows. */
  const removeError = ref<ApiError | null>(null)
  /** Matches for a picker, kept apart from the list so searching there leaves the table alone. */
  const matches = ref<T[]>([]) as Ref<T[]>
  const isSearching = ref(false)
  const searchError = ref<ApiError | null>(null)

  function show(record: T): T {
    current.value = record
    listItems.value = listItems.value.map((r) => (r.id === record.id ? record : r))
    return record
  }

  async function get(id: string): Promise<T | null> {
    if (current.value?.id !== id) current.value = null
    // The page says "We can't find that …" itself.
    const ok = await attempt(isLoadingCurrent, currentError, async () => void show(await api.get(id)), [404])
    return ok ? current.value : null
  }

  async function saving(call: () => Promise<T>): Promise<T | null> {
    let saved: T | null = null
    await attempt(isSaving, saveError, async () => {
      saved = show(await call())
    })
    return saved
  }

  /** Creates when there is no id; returns the saved record, or null with `saveError` set. */
  const save = (input: I, id?: string) => saving(() => (id ? api.update(id, input) : api.create(input)))

  async function remove(id: string): Promise<boolean> {
    const ok = await attempt(isRemoving, removeError, () => api.remove(id))
    if (ok) {
      if (current.value?.id === id) current.value = null
      listItems.value = listItems.value.filter((r) => r.id !== id)
    }
    return ok
  }

  async function lookup(q: string): Promise<void> {
    const search = api.search
    if (!search) return
    await attempt(isSearching, searchError, async () => {
      matches.value = await search(q.trim())
    })
  }

  function clearErrors(): void {
    saveError.value = null
    removeError.value = null
  }

  const { archive, restore } = api
  return {
    current,
    isLoadingCurrent,
    currentError,
    isSaving,
    saveError,
    isRemoving,
    removeError,
    matches,
    isSearching,
    get,
    save,
    archive: (id: string) => (archive ? saving(() => archive(id)) : Promise.resolve(null)),
    restore: (id: string) => (restore ? saving(() => restore(id)) : Promise.resolve(null)),
    remove,
    lookup,
    clearErrors,
  }
}
