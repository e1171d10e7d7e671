import { AuditListQuerySchema, type AuditEvent, type AuditListQuery } from '../../../shared/schemas/audit'
import type { Page } from '../../../shared/schemas/common'
import type { Database } from '../../db/client'
import { type RouteTable, staffWith } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { validate } from '../../middleware/validate'
import { createAuditRepo } from './audit.repo'

export function auditRoutes(table: RouteTable, db: Database) {
  const repo = createAuditRepo(db)
  const g = table.group('/audit-events')
  g.get('', staffWith('audit:read'), validate({ query: AuditListQuerySchema }), async (req, res) => {
    const q = req.query as unknown as AuditListQuery
    const me = staffOf(req)
    const { items, total } = await repo.list(me.workshop.id, me.workshop.timezone, q)
    const page: Page<AuditEvent> = {
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
    res.json(page)
  })
  return g
}
