/** The paging, sorting and search every record list takes (shared/schemas/common.ts listQuerySchema). */
export interface ListParams<SortKey extends string = string> {
  page: number
  pageSize: number
  sortBy?: SortKey
  sortDesc?: boolean
  q?: string
}

/** Builds `?page=1&pageSize=25…`, leaving out what is unset so the server's defaults apply. */
export function queryString(params: object): string {
  const search = new URLSearchParams()
  for (const [key, value] of Object.entries(params)) {
    if (value === undefined || value === null || value === '') continue
    search.set(key, String(value))
  }
  const text = search.toString()
  return text ? `?${text}` : ''
}
