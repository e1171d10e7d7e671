import type { AuditEvent, AuditListQuery } from '@shared/schemas/audit'
import type { Page } from '@shared/schemas/common'
import { request } from './http'

/** Dates in the query are YYYY-MM-DD. */
export function listAuditEvents(query: AuditListQuery): Promise<Page<AuditEvent>> {
  const params = new URLSearchParams()
  for (const [key, value] of Object.entries(query)) {
    // An empty filter means "any", which the server spells by leaving the parameter out.
    if (value !== undefined && value !== '') params.set(key, String(value))
  }
  return request<Page<AuditEvent>>('GET', `/audit-events?${params.toString()}`)
}
