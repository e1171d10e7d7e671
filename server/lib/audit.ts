import type { Request } from 'express'
import type { Database } from '../db/client'
import { auditEvents } from '../db/schema'
import type { AuditAction } from '../../shared/schemas/audit'

export interface AuditEntry {
  action: AuditAction
  workshopId: string | null
  actor?: { kind: 'staff' | 'customer' | 'anonymous' | 'system'; id?: string | null; name?: string | null }
  subject?: { type: string; id: string }
  details?: Record<string, unknown>
}

/** Who did it comes from the signed-in user unless the entry says otherwise; where from comes from the request. */
export async function recordAudit(db: Pick<Database, 'insert'>, req: Request | null, entry: AuditEntry): Promise<void> {
  const user = req?.user
  const actor = entry.actor ?? (user ? { kind: user.kind, id: user.id, name: user.name } : { kind: 'anonymous' as const })
  await db.insert(auditEvents).values({
    workshopId: entry.workshopId,
    actorKind: actor.kind,
    actorId: actor.id ?? null,
    actorName: actor.name ?? null,
    action: entry.action,
    subjectType: entry.subject?.type ?? null,
    subjectId: entry.subject?.id ?? null,
    details: entry.details ?? {},
    ip: req?.ip ?? null,
    userAgent: req?.get('user-agent')?.slice(0, 400) ?? null,
  })
}
