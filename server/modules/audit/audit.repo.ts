import { type SQL, and, asc, count, desc, eq, sql } from 'drizzle-orm'
import type { Database } from '../../db/client'
import { auditEvents } from '../../db/schema'
import type { AuditListQuery } from '../../../shared/schemas/audit'

export function createAuditRepo(db: Database) {
  return {
    /** `from` and `to` are whole days in the workshop's own time zone, as the log shows its times. */
    async list(workshopId: string, timezone: string, q: AuditListQuery) {
      const where: SQL[] = [eq(auditEvents.workshopId, workshopId)]
      if (q.action) where.push(eq(auditEvents.action, q.action))
      if (q.actorId) where.push(eq(auditEvents.actorId, q.actorId))
      if (q.from) where.push(sql`${auditEvents.createdAt} >= (${q.from}::date::timestamp at time zone ${timezone})`)
      if (q.to) where.push(sql`${auditEvents.createdAt} < ((${q.to}::date + 1)::timestamp at time zone ${timezone})`)
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
        db
          .select({ n: count() })
          .from(auditEvents)
          .where(and(...where)),
      ])
      return { items, total: total?.n ?? 0 }
    },
  }
}

export type AuditRepo = ReturnType<typeof createAuditRepo>
