import type { z } from 'zod'
import type { listQuerySchema } from '@shared/schemas/common'

/**
 * The paging, sorting and search every record list takes, as the contract parses them: the client
 * holds numbers and true/false, which queryString() writes as the text the schema reads back.
 * Type-only imports, so the browser bundle gains no zod.
 */
export type ListParams<SortKey extends string = string> = z.output<ReturnType<typeof listQuerySchema<readonly [SortKey, ...SortKey[]]>>>

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
