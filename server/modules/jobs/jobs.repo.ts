import { type SQL, and, asc, count, desc, eq, ilike, inArray, or, sql } from 'drizzle-orm'
import type { Database, Queryable } from '../../db/client'
import { customers, jobs, staffUsers, vehicles } from '../../db/schema'
import { canMoveJob, type JobInput, type JobListQuery, type JobStatus } from '../../../shared/schemas/records'
import { likePattern } from '../../lib/db-errors'

/**
 * Moves a job to `to` when its status is one of `from`, inside the caller's transaction; answers
 * whether it moved. Every automatic move (an inspection starting, an estimate sent, a deposit paid)
 * goes through here, and each one must be a move the shared table allows.
 */
export async function setJobStatus(
  q: Queryable,
  workshopId: string,
  jobId: string,
  from: readonly JobStatus[],
  to: JobStatus,
): Promise<boolean> {
  const refused = from.filter((f) => !canMoveJob(f, to))
  if (refused.length > 0) throw new Error(`job status cannot move from ${refused.join(', ')} to ${to}`)
  const moved = await q
    .update(jobs)
    .set({ status: to })
    .where(and(eq(jobs.workshopId, workshopId), eq(jobs.id, jobId), inArray(jobs.status, [...from])))
    .returning({ id: jobs.id })
  return moved.length > 0
}

export function createJobsRepo(db: Database) {
  const base = () =>
    db
      .select({
        row: jobs,
        registration: vehicles.registration,
        vehicleDescription: sql<string>`concat_ws(' ', ${vehicles.make}, ${vehicles.model})`,
        customerId: customers.id,
        customerName: customers.name,
        technicianName: staffUsers.name,
      })
      .from(jobs)
      .innerJoin(vehicles, eq(vehicles.id, jobs.vehicleId))
      .innerJoin(customers, eq(customers.id, vehicles.customerId))
      .leftJoin(staffUsers, eq(staffUsers.id, jobs.technicianId))
  return {
    async list(workshopId: string, q: JobListQuery) {
      const where: SQL[] = [eq(jobs.workshopId, workshopId)]
      if (q.status) where.push(eq(jobs.status, q.status))
      if (q.technicianId) where.push(eq(jobs.technicianId, q.technicianId))
      if (q.vehicleId) where.push(eq(jobs.vehicleId, q.vehicleId))
      if (q.q) {
        const p = likePattern(q.q)
        // As for vehicles: a plate matches typed with or without its space.
        const plate = likePattern(q.q.replace(/\s+/g, ''))
        const any = or(ilike(jobs.concern, p), ilike(sql`replace(${vehicles.registration}, ' ', '')`, plate), ilike(customers.name, p))
        if (any) where.push(any)
      }
      const column =
        q.sortBy === 'status'
          ? jobs.status
          : q.sortBy === 'registration'
            ? vehicles.registration
            : q.sortBy === 'bookedFor'
              ? jobs.bookedFor
              : jobs.createdAt
      const descending = q.sortDesc ?? q.sortBy === undefined
      const [items, [total]] = await Promise.all([
        base()
          .where(and(...where))
          .orderBy(descending ? desc(column) : asc(column), desc(jobs.createdAt))
          .limit(q.pageSize)
          .offset((q.page - 1) * q.pageSize),
        db
          .select({ n: count() })
          .from(jobs)
          .innerJoin(vehicles, eq(vehicles.id, jobs.vehicleId))
          .innerJoin(customers, eq(customers.id, vehicles.customerId))
          .where(and(...where)),
      ])
      return { items, total: total?.n ?? 0 }
    },
    async find(workshopId: string, id: string) {
      const [row] = await base().where(and(eq(jobs.workshopId, workshopId), eq(jobs.id, id)))
      return row
    },
    async vehicleExists(workshopId: string, vehicleId: string) {
      const [row] = await db
        .select({ id: vehicles.id })
        .from(vehicles)
        .where(and(eq(vehicles.workshopId, workshopId), eq(vehicles.id, vehicleId)))
      return Boolean(row)
    },
    async activeStaffExists(workshopId: string, staffId: string) {
      const [row] = await db
        .select({ id: staffUsers.id })
        .from(staffUsers)
        .where(and(eq(staffUsers.workshopId, workshopId), eq(staffUsers.id, staffId), sql`${staffUsers.deactivatedAt} is null`))
      return Boolean(row)
    },
    async insert(workshopId: string, input: JobInput) {
      const [row] = await db
        .insert(jobs)
        .values({ ...input, workshopId })
        .returning()
      if (!row) throw new Error('job insert returned nothing')
      return row
    },
    async update(workshopId: string, id: string, input: Partial<JobInput>) {
      const [row] = await db
        .update(jobs)
        .set(input)
        .where(and(eq(jobs.workshopId, workshopId), eq(jobs.id, id)))
        .returning()
      return row
    },
    async remove(workshopId: string, id: string) {
      const rows = await db
        .delete(jobs)
        .where(and(eq(jobs.workshopId, workshopId), eq(jobs.id, id)))
        .returning({ id: jobs.id })
      return rows.length > 0
    },
  }
}

export type JobsRepo = ReturnType<typeof createJobsRepo>
