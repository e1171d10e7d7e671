import { sql } from 'drizzle-orm'
import { boolean, check, index, pgTable, text, timestamp, unique, uuid } from 'drizzle-orm/pg-core'
import { id, timestamps } from './columns'
import { workshops } from './workshops'

export const customers = pgTable(
  'customers',
  {
    id: id(),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    name: text().notNull(),
    email: text(),
    phone: text(),
    addressLines: text()
      .array()
      .notNull()
      .default(sql`'{}'::text[]`),
    postcode: text(),
    contactByEmail: boolean().notNull().default(true),
    contactByPhone: boolean().notNull().default(false),
    contactBySms: boolean().notNull().default(false),
    archivedAt: timestamp({ withTimezone: true }),
    ...timestamps,
  },
  (t) => [
    unique('customers_workshop_id_id').on(t.workshopId, t.id),
    index('customers_workshop_name').on(t.workshopId, t.name),
    check('customers_name_present', sql`length(trim(${t.name})) > 0`),
    check('customers_email_shape', sql`${t.email} is null or ${t.email} ~ '^[^@\\s]+@[^@\\s]+$'`),
    check('customers_reachable', sql`${t.email} is not null or ${t.phone} is not null`),
  ],
)
