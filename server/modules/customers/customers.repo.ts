import { type SQL, and, asc, count, desc, eq, ilike, isNotNull, isNull, or, sql } from 'drizzle-orm'
import type { Database } from '../../db/client'
import { customers, vehicles } from '../../db/schema'
import type { CustomerInput, CustomerListQuery } from '../../../shared/schemas/records'
import { likePattern } from '../../lib/db-errors'

export type CustomerRow = typeof customers.$inferSelect

export function createCustomersRepo(db: Database) {
  // Qualified by hand: in a one-table select drizzle writes bare column names, and inside this subquery a
  // bare "id" would be the vehicle's own id, so every customer counted 0 vehicles.
  const col = (table: typeof vehicles | typeof customers, name: string) => sql`${table}.${sql.identifier(name)}`
  const vehicleCount = sql<number>`(select count(*)::int from ${vehicles} where ${col(vehicles, 'customer_id')} = ${col(customers, 'id')} and ${col(vehicles, 'archived_at')} is null)`
  return {
    async list(workshopId: string, q: CustomerListQuery) {
      const where: SQL[] = [eq(customers.workshopId, workshopId)]
      where.push(q.archived ? isNotNull(customers.archivedAt) : isNull(customers.archivedAt))
      if (q.q) {
        const p = likePattern(q.q)
        // Phone numbers are typed with and without spaces: compare both without them.
        const compact = likePattern(q.q.replace(/\s+/g, ''))
        const phone = sql`replace(${customers.phone}, ' ', '')`
        const any = or(ilike(customers.name, p), ilike(customers.email, p), ilike(phone, compact), ilike(customers.postcode, p))
        if (any) where.push(any)
      }
      const column = q.sortBy === 'createdAt' ? customers.createdAt : customers.name
      const [items, [total]] = await Promise.all([
        db
          .select({ row: customers, vehicleCount })
          .from(customers)
          .where(and(...where))
          .orderBy(q.sortDesc ? desc(column) : asc(column), asc(customers.id))
          .limit(q.pageSize)
          .offset((q.page - 1) * q.pageSize),
        db
          .select({ n: count() })
          .from(customers)
          .where(and(...where)),
      ])
      return { items, total: total?.n ?? 0 }
    },
    async find(workshopId: string, id: string) {
      const [row] = await db
        .select({ row: customers, vehicleCount })
        .from(customers)
        .where(and(eq(customers.workshopId, workshopId), eq(customers.id, id)))
      return row
    },
    async insert(workshopId: string, input: CustomerInput) {
      const [row] = await db
        .insert(customers)
        .values({ ...input, workshopId })
        .returning()
      if (!row) throw new Error('customer insert returned nothing')
      return row
    },
    async update(workshopId: string, id: string, values: Partial<typeof customers.$inferInsert>) {
      const [row] = await db
        .update(customers)
        .set(values)
        .where(and(eq(customers.workshopId, workshopId), eq(customers.id, id)))
        .returning()
      return row
    },
    async remove(workshopId: string, id: string) {
      const rows = await db
        .delete(customers)
        .where(and(eq(customers.workshopId, workshopId), eq(customers.id, id)))
        .returning({ id: customers.id })
      return rows.length > 0
    },
  }
}

export type CustomersRepo = ReturnType<typeof createCustomersRepo>
