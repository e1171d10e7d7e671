import { sql } from 'drizzle-orm'
import { check, pgEnum, pgTable, text, timestamp, unique, uniqueIndex, uuid } from 'drizzle-orm/pg-core'
import { id, timestamps } from './columns'
import { workshops } from './workshops'

export const staffRole = pgEnum('staff_role', ['owner', 'advisor', 'technician'])

export const staffUsers = pgTable(
  'staff_users',
  {
    id: id(),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    email: text().notNull(),
    name: text().notNull(),
    role: staffRole().notNull(),
    deactivatedAt: timestamp({ withTimezone: true }),
    lastSignInAt: timestamp({ withTimezone: true }),
    ...timestamps,
  },
  (t) => [
    unique('staff_users_workshop_id_id').on(t.workshopId, t.id),
    uniqueIndex('staff_users_email_unique').on(sql`lower(${t.email})`),
    check('staff_users_email_shape', sql`${t.email} ~ '^[^@\\s]+@[^@\\s]+$'`),
    check('staff_users_name_present', sql`length(trim(${t.name})) > 0`),
  ],
)
