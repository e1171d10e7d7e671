import { type SQL, and, asc, count, desc, eq, gte, lt } from 'drizzle-orm'
import type { Database } from '../../db/client'
import { auditEvents } from '../../db/schema'
import type { AuditListQuery } from '../../../shared/schemas/audit'

export function createAuditRepo(db: Database) {
  return {
    async list(workshopId: string, q: AuditListQuery) {
      const where: SQL[] = [eq(auditEvents.workshopId, workshopId)]
      if (q.action) where.push(eq(auditEvents.action, q.action))
      if (q.actorId) where.push(eq(auditEvents.actorId, q.actorId))
      if (q.from) where.push(gte(auditEvents.createdAt, new Date(`${q.from}T00:00:00Z`)))
      if (q.to) where.push(lt(auditEvents.createdAt, new Date(Date.parse(`${q.to}T00:00:00Z`) + 86_400_000)))
      const column = q.sortBy === 'action' ? auditEvents.action : auditEvents.createdAt
      const order = q.sortDesc === false ? asc(column) : desc(column)
      const [items, [total]] = await Promise.all([
        db
          .select()
          .from(auditEvents)
          .where(and(...where))
          .orderBy(order, desc(auditEvents.id))
          .limit(q.pageSize)
          .offset((q.page - 1) * q.pageSize),
        db.select({ n: count() }).from(auditEvents).where(and(...where)),
      ])
      return { items, total: total?.n ?? 0 }
    },
  }
}
