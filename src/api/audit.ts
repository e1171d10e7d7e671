import type { AuditEvent } from '@shared/schemas/audit'
import type { Page } from '@shared/schemas/common'
import { request } from './http'

/** The query GET /audit-events understands (AuditListQuerySchema); dates are YYYY-MM-DD. */
export interface AuditQuery {
  page: number
  pageSize: number
  sortBy?: 'createdAt' | 'action'
  sortDesc?: boolean
  action?: string
  actorId?: string
  from?: string
  to?: string
}

export function listAuditEvents(query: AuditQuery): Promise<Page<AuditEvent>> {
  const params = new URLSearchParams()
  for (const [key, value] of Object.entries(query)) {
    // An empty filter means "any", which the server spells by leaving the parameter out.
    if (value !== undefined && value !== '') params.set(key, String(value))
  }
  return request<Page<AuditEvent>>('GET', `/audit-events?${params.toString()}`)
}
