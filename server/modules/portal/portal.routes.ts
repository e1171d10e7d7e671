import { and, asc, eq, isNull } from 'drizzle-orm'
import type { Database } from '../../db/client'
import { vehicles } from '../../db/schema'
import { type RouteTable, customerOnly } from '../../lib/route-table'
import { customerOf } from '../../middleware/auth'

/** What a signed-in customer sees of their own records; estimates join this list with the portal work. */
export function portalRoutes(table: RouteTable, db: Database) {
  const g = table.group('/portal')
  g.get('/vehicles', customerOnly, async (req, res) => {
    const me = customerOf(req)
    const rows = await db
      .select({ id: vehicles.id, registration: vehicles.registration, make: vehicles.make, model: vehicles.model, year: vehicles.year })
      .from(vehicles)
      .where(and(eq(vehicles.workshopId, me.workshop.id), eq(vehicles.customerId, me.id), isNull(vehicles.archivedAt)))
      .orderBy(asc(vehicles.registration))
    res.json({ items: rows })
  })
  return g
}
