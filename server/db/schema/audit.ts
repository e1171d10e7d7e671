import { bigserial, index, jsonb, pgEnum, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core'
import { workshops } from './workshops'

export const actorKind = pgEnum('actor_kind', ['staff', 'customer', 'anonymous', 'system'])

/** Append-only: a trigger (migration 0002) rejects UPDATE, DELETE and TRUNCATE. */
export const auditEvents = pgTable(
  'audit_events',
  {
    id: bigserial({ mode: 'bigint' }).primaryKey(),
    workshopId: uuid().references(() => workshops.id, { onDelete: 'restrict' }),
    actorKind: actorKind().notNull(),
    actorId: uuid(),
    actorName: text(),
    action: text().notNull(),
    subjectType: text(),
    subjectId: text(),
    details: jsonb().$type<Record<string, unknown>>().notNull().default({}),
    ip: text(),
    userAgent: text(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index('audit_events_workshop_time').on(t.workshopId, t.createdAt),
    index('audit_events_workshop_action').on(t.workshopId, t.action),
  ],
)
