import { type SQL, and, asc, count, desc, eq, ilike, isNotNull, isNull, or, sql } from 'drizzle-orm'
import type { Database } from '../../db/client'
import { customers, vehicles } from '../../db/schema'
import type { VehicleInput, VehicleListQuery } from '../../../shared/schemas/records'
import { likePattern } from '../../lib/db-errors'

export type VehicleRow = typeof vehicles.$inferSelect

export function createVehiclesRepo(db: Database) {
  const base = () =>
    db.select({ row: vehicles, customerName: customers.name }).from(vehicles).innerJoin(customers, eq(customers.id, vehicles.customerId))
  return {
    async list(workshopId: string, q: VehicleListQuery) {
      const where: SQL[] = [eq(vehicles.workshopId, workshopId)]
      where.push(q.archived ? isNotNull(vehicles.archivedAt) : isNull(vehicles.archivedAt))
      if (q.customerId) where.push(eq(vehicles.customerId, q.customerId))
      if (q.q) {
        const p = likePattern(q.q)
        // Plates are written with and without their space ("BF19 KRT", "bf19krt"): compare both without spaces.
        const compact = likePattern(q.q.replace(/\s+/g, ''))
        const any = or(
          ilike(sql`replace(${vehicles.registration}, ' ', '')`, compact),
          ilike(vehicles.vin, p),
          ilike(vehicles.make, p),
          ilike(vehicles.model, p),
          ilike(customers.name, p),
        )
        if (any) where.push(any)
      }
      const column = q.sortBy === 'make' ? vehicles.make : q.sortBy === 'createdAt' ? vehicles.createdAt : vehicles.registration
      const [items, [total]] = await Promise.all([
        base()
          .where(and(...where))
          .orderBy(q.sortDesc ? desc(column) : asc(column), asc(vehicles.id))
          .limit(q.pageSize)
          .offset((q.page - 1) * q.pageSize),
        db
          .select({ n: count() })
          .from(vehicles)
          .innerJoin(customers, eq(customers.id, vehicles.customerId))
          .where(and(...where)),
      ])
      return { items, total: total?.n ?? 0 }
    },
    async find(workshopId: string, id: string) {
      const [row] = await base().where(and(eq(vehicles.workshopId, workshopId), eq(vehicles.id, id)))
      return row
    },
    async customerExists(workshopId: string, customerId: string) {
      const [row] = await db
        .select({ id: customers.id })
        .from(customers)
        .where(and(eq(customers.workshopId, workshopId), eq(customers.id, customerId)))
      return Boolean(row)
    },
    async insert(workshopId: string, input: VehicleInput) {
      const [row] = await db
        .insert(vehicles)
        .values({ ...input, workshopId })
        .returning()
      if (!row) throw new Error('vehicle insert returned nothing')
      return row
    },
    async update(workshopId: string, id: string, values: Partial<typeof vehicles.$inferInsert>) {
      const [row] = await db
        .update(vehicles)
        .set(values)
        .where(and(eq(vehicles.workshopId, workshopId), eq(vehicles.id, id)))
        .returning()
      return row
    },
    async remove(workshopId: string, id: string) {
      const rows = await db
        .delete(vehicles)
        .where(and(eq(vehicles.workshopId, workshopId), eq(vehicles.id, id)))
        .returning({ id: vehicles.id })
      return rows.length > 0
    },
  }
}

export type VehiclesRepo = ReturnType<typeof createVehiclesRepo>
