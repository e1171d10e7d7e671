import { sql } from 'drizzle-orm'
import { check, date, foreignKey, index, pgEnum, pgTable, text, unique, uuid } from 'drizzle-orm/pg-core'
import { id, timestamps } from './columns'
import { staffUsers } from './staff'
import { vehicles } from './vehicles'
import { workshops } from './workshops'

export const jobStatus = pgEnum('job_status', [
  'booked_in',
  'inspecting',
  'quoting',
  'waiting_for_customer',
  'in_work',
  'finished',
  'cancelled',
])

export const jobs = pgTable(
  'jobs',
  {
    id: id(),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    vehicleId: uuid().notNull(),
    concern: text().notNull(),
    status: jobStatus().notNull().default('booked_in'),
    technicianId: uuid(),
    bookedFor: date(),
    promisedFor: date(),
    ...timestamps,
  },
  (t) => [
    foreignKey({ columns: [t.workshopId, t.vehicleId], foreignColumns: [vehicles.workshopId, vehicles.id] }).onDelete('restrict'),
    // Staff are deactivated, never deleted, so the assignment can stay; it must be someone of the same workshop.
    foreignKey({ columns: [t.workshopId, t.technicianId], foreignColumns: [staffUsers.workshopId, staffUsers.id] }).onDelete('restrict'),
    unique('jobs_workshop_id_id').on(t.workshopId, t.id),
    index('jobs_workshop_status').on(t.workshopId, t.status),
    check('jobs_concern_present', sql`length(trim(${t.concern})) > 0`),
    check('jobs_promised_after_booked', sql`${t.promisedFor} is null or ${t.bookedFor} is null or ${t.promisedFor} >= ${t.bookedFor}`),
  ],
)
