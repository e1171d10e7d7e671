import { sql } from 'drizzle-orm'
import { check, foreignKey, index, integer, pgEnum, pgTable, text, timestamp, unique, uuid } from 'drizzle-orm/pg-core'
import { id, timestamps } from './columns'
import { customers } from './customers'
import { workshops } from './workshops'

export const odometerUnit = pgEnum('odometer_unit', ['mi', 'km'])

export const vehicles = pgTable(
  'vehicles',
  {
    id: id(),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    customerId: uuid().notNull(),
    registration: text().notNull(),
    vin: text(),
    make: text().notNull(),
    model: text().notNull(),
    year: integer(),
    odometer: integer(),
    odometerUnit: odometerUnit().notNull().default('mi'),
    vehicleGroup: text(),
    archivedAt: timestamp({ withTimezone: true }),
    ...timestamps,
  },
  (t) => [
    // The owning customer must belong to the same workshop.
    foreignKey({ columns: [t.workshopId, t.customerId], foreignColumns: [customers.workshopId, customers.id] }).onDelete('restrict'),
    unique('vehicles_workshop_id_id').on(t.workshopId, t.id),
    index('vehicles_workshop_registration').on(t.workshopId, t.registration),
    check('vehicles_registration_present', sql`length(trim(${t.registration})) > 0`),
    // ISO 3779: 17 characters, letters I, O and Q never used.
    check('vehicles_vin_iso3779', sql`${t.vin} is null or ${t.vin} ~ '^[A-HJ-NPR-Z0-9]{17}$'`),
    check('vehicles_year_range', sql`${t.year} is null or ${t.year} between 1886 and 2100`),
    check('vehicles_odometer_positive', sql`${t.odometer} is null or ${t.odometer} >= 0`),
  ],
)
