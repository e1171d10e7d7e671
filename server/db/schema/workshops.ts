import { sql } from 'drizzle-orm'
import { check, jsonb, pgTable, text } from 'drizzle-orm/pg-core'
import { id, timestamps } from './columns'
import { DEFAULT_ESTIMATE_DEFAULTS, type EstimateDefaults } from '../../../shared/schemas/estimates'

export const workshops = pgTable(
  'workshops',
  {
    id: id(),
    name: text().notNull(),
    addressLines: text()
      .array()
      .notNull()
      .default(sql`'{}'::text[]`),
    postcode: text(),
    phone: text(),
    email: text(),
    vatNumber: text(),
    currency: text().notNull().default('GBP'),
    timezone: text().notNull().default('Europe/London'),
    /** What a new estimate starts with: tax basis and rounding, discount, deposit policy, days to expiry. */
    estimateDefaults: jsonb().$type<EstimateDefaults>().notNull().default(DEFAULT_ESTIMATE_DEFAULTS),
    ...timestamps,
  },
  (t) => [
    check('workshops_name_present', sql`length(trim(${t.name})) > 0`),
    check('workshops_currency_iso', sql`${t.currency} ~ '^[A-Z]{3}$'`),
  ],
)
