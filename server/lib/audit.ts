import type { Request } from 'express'
import type { Queryable } from '../db/client'
import { auditEvents } from '../db/schema'
import type { AuditAction } from '../../shared/schemas/audit'

export type AuditActor = { kind: 'staff' | 'customer' | 'anonymous' | 'system'; id?: string | null; name?: string | null }

/**
 * Who is acting and from where: everything a service needs of an HTTP request to write the audit log
 * and the records the law asks for (a confirmation's IP and user agent). Routes build it with
 * `auditContextOf(req)`; workers and webhooks use `systemContext()`. Services never see Express.
 */
export interface AuditContext {
  actor: AuditActor
  /** The signed-in person's workshop; null for anonymous callers and the provider's webhooks. */
  workshopId: string | null
  ip: string | null
  userAgent: string | null
  requestId: string | null
}

export function auditContextOf(req: Pick<Request, 'user' | 'ip' | 'get'> & { id?: unknown }): AuditContext {
  const user = req.user
  return {
    actor: user ? { kind: user.kind, id: user.id, name: user.name } : { kind: 'anonymous' },
    workshopId: user?.workshop.id ?? null,
    ip: req.ip ?? null,
    userAgent: req.get('user-agent')?.slice(0, 400) ?? null,
    requestId: typeof req.id === 'string' ? req.id : req.id === undefined ? null : String(req.id),
  }
}

/** Work started by the system itself (a webhook, a scheduled job): no person and no browser behind it. */
export function systemContext(requestId: string | null = null): AuditContext {
  return { actor: { kind: 'system' }, workshopId: null, ip: null, userAgent: null, requestId }
}

export interface AuditEntry {
  action: AuditAction
  workshopId: string | null
  /** Overrides the context's actor: a customer signing in through a link is anonymous until the entry says who. */
  actor?: AuditActor
  subject?: { type: string; id: string }
  details?: Record<string, unknown>
}

/** Appends one event to the audit log, inside the caller's transaction when it passes one. */
export async function recordAudit(db: Pick<Queryable, 'insert'>, ctx: AuditContext | null, entry: AuditEntry): Promise<void> {
  const actor = entry.actor ?? ctx?.actor ?? { kind: 'anonymous' as const }
  await db.insert(auditEvents).values({
    workshopId: entry.workshopId,
    actorKind: actor.kind,
    actorId: actor.id ?? null,
    actorName: actor.name ?? null,
    action: entry.action,
    subjectType: entry.subject?.type ?? null,
    subjectId: entry.subject?.id ?? null,
    details: entry.details ?? {},
    ip: ctx?.ip ?? null,
    userAgent: ctx?.userAgent ?? null,
  })
}
