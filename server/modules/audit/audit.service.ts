import type { AuditEvent, AuditListQuery } from '../../../shared/schemas/audit'
import type { StaffPrincipal } from '../../../shared/schemas/auth'
import type { Page } from '../../../shared/schemas/common'
import type { AuditRepo } from './audit.repo'

/** The workshop's audit log as the owner reads it, whole days in the workshop's own time zone. */
export function createAuditService(repo: AuditRepo) {
  return {
    async list(me: StaffPrincipal, q: AuditListQuery): Promise<Page<AuditEvent>> {
      const { items, total } = await repo.list(me.workshop.id, me.workshop.timezone, q)
      return {
        items: items.map((e) => ({
          id: e.id.toString(),
          action: e.action,
          actorKind: e.actorKind,
          actorId: e.actorId,
          actorName: e.actorName,
          subjectType: e.subjectType,
          subjectId: e.subjectId,
          details: e.details,
          ip: e.ip,
          userAgent: e.userAgent,
          createdAt: e.createdAt.toISOString(),
        })),
        total,
        page: q.page,
        pageSize: q.pageSize,
      }
    },
  }
}

export type AuditService = ReturnType<typeof createAuditService>
