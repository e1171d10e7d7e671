import { sql } from 'drizzle-orm'
import { check, index, integer, json, pgEnum, pgTable, text, timestamp, uuid, varchar } from 'drizzle-orm/pg-core'
import { customers } from './customers'
import { staffUsers } from './staff'
import { workshops } from './workshops'

export const principalKind = pgEnum('principal_kind', ['staff', 'customer'])

/** One row per e-mailed sign-in link. Only the SHA-256 of the token is kept; used_at makes it single use. */
export const signInTokens = pgTable(
  'sign_in_tokens',
  {
    tokenHash: text().primaryKey(),
    principalKind: principalKind().notNull(),
    staffUserId: uuid().references(() => staffUsers.id, { onDelete: 'cascade' }),
    customerId: uuid().references(() => customers.id, { onDelete: 'cascade' }),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'cascade' }),
    expiresAt: timestamp({ withTimezone: true }).notNull(),
    usedAt: timestamp({ withTimezone: true }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    check('sign_in_tokens_hash_shape', sql`${t.tokenHash} ~ '^[0-9a-f]{64}$'`),
    check(
      'sign_in_tokens_one_principal',
      sql`(${t.principalKind} = 'staff' and ${t.staffUserId} is not null and ${t.customerId} is null) or (${t.principalKind} = 'customer' and ${t.customerId} is not null and ${t.staffUserId} is null)`,
    ),
    index('sign_in_tokens_expires').on(t.expiresAt),
  ],
)

/** The table connect-pg-simple reads and writes (its documented shape). */
export const sessions = pgTable(
  'sessions',
  {
    sid: varchar().primaryKey(),
    sess: json().notNull(),
    expire: timestamp({ precision: 6 }).notNull(),
  },
  (t) => [index('sessions_expire').on(t.expire)],
)

/** Counters for express-rate-limit, shared by every server process. */
export const rateLimits = pgTable('rate_limits', {
  key: text().primaryKey(),
  hits: integer().notNull(),
  resetsAt: timestamp({ withTimezone: true }).notNull(),
})
