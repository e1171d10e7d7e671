import { eq } from 'drizzle-orm'
import type { Database } from '../../db/client'
import { workshops } from '../../db/schema'
import type { WorkshopSettings } from '../../../shared/schemas/workshop'

export type WorkshopRow = typeof workshops.$inferSelect

export function createWorkshopRepo(db: Database) {
  return {
    async find(id: string) {
      const [row] = await db.select().from(workshops).where(eq(workshops.id, id))
      return row
    },
    async update(id: string, values: WorkshopSettings) {
      const [row] = await db
        .update(workshops)
        .set({
          ...values,
          postcode: values.postcode ?? null,
          phone: values.phone ?? null,
          email: values.email ?? null,
          vatNumber: values.vatNumber ?? null,
        })
        .where(eq(workshops.id, id))
        .returning()
      return row
    },
  }
}

export type WorkshopRepo = ReturnType<typeof createWorkshopRepo>
