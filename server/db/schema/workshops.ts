import { sql } from 'drizzle-orm'
import { check, pgTable, text } from 'drizzle-orm/pg-core'
import { id, timestamps } from './columns'

export const workshops = pgTable(
  'workshops',
  {
    id: id(),
    name: text().notNull(),
    addressLines: text().array().notNull().default(sql`'{}'::text[]`),
    postcode: text(),
    phone: text(),
    email: text(),
    vatNumber: text(),
    currency: text().notNull().default('GBP'),
    timezone: text().notNull().default('Europe/London'),
    ...timestamps,
  },
  (t) => [
    check('workshops_name_present', sql`length(trim(${t.name})) > 0`),
    check('workshops_currency_iso', sql`${t.currency} ~ '^[A-Z]{3}$'`),
  ],
)
