import { and, asc, count, eq, isNull, ne, sql } from 'drizzle-orm'
import type { Database } from '../../db/client'
import { staffUsers } from '../../db/schema'
import type { StaffRole } from '../../../shared/auth/policy'

export type StaffRow = typeof staffUsers.$inferSelect

export function createStaffRepo(db: Database) {
  return {
    list(workshopId: string) {
      return db.select().from(staffUsers).where(eq(staffUsers.workshopId, workshopId)).orderBy(asc(staffUsers.name))
    },
    async find(workshopId: string, id: string) {
      const [row] = await db
        .select()
        .from(staffUsers)
        .where(and(eq(staffUsers.workshopId, workshopId), eq(staffUsers.id, id)))
      return row
    },
    async emailTaken(email: string) {
      const [row] = await db
        .select({ id: staffUsers.id })
        .from(staffUsers)
        .where(sql`lower(${staffUsers.email}) = ${email.toLowerCase()}`)
      return Boolean(row)
    },
    async insert(values: typeof staffUsers.$inferInsert) {
      const [row] = await db.insert(staffUsers).values(values).returning()
      if (!row) throw new Error('staff insert returned nothing')
      return row
    },
    async update(workshopId: string, id: string, values: Partial<typeof staffUsers.$inferInsert>) {
      const [row] = await db
        .update(staffUsers)
        .set(values)
        .where(and(eq(staffUsers.workshopId, workshopId), eq(staffUsers.id, id)))
        .returning()
      return row
    },
    async otherActiveOwners(workshopId: string, exceptId: string) {
      const [row] = await db
        .select({ n: count() })
        .from(staffUsers)
        .where(
          and(
            eq(staffUsers.workshopId, workshopId),
            eq(staffUsers.role, 'owner' satisfies StaffRole),
            isNull(staffUsers.deactivatedAt),
            ne(staffUsers.id, exceptId),
          ),
        )
      return row?.n ?? 0
    },
  }
}

export type StaffRepo = ReturnType<typeof createStaffRepo>
