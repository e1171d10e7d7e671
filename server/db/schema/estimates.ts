import { sql } from 'drizzle-orm'
import {
  check,
  date,
  foreignKey,
  index,
  inet,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  timestamp,
  unique,
  uniqueIndex,
  uuid,
} from 'drizzle-orm/pg-core'
import { id, timestamps } from './columns'
import { customers } from './customers'
import { jobs } from './jobs'
import { staffUsers } from './staff'
import { workshops } from './workshops'
import type { EstimateDraft, EstimateSnapshot } from '../../../shared/schemas/estimates'
import type { EstimateResult } from '../../../shared/estimate/contract'

/** One gap-free sequence per workshop; the row is locked by the creating transaction. */
export const estimateCounters = pgTable('estimate_counters', {
  workshopId: uuid()
    .primaryKey()
    .references(() => workshops.id, { onDelete: 'restrict' }),
  lastNumber: integer().notNull().default(0),
})

export const estimates = pgTable(
  'estimates',
  {
    id: id(),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    jobId: uuid().notNull(),
    number: integer().notNull(),
    /** What the advisor is editing; sending copies it into a version. */
    draft: jsonb().$type<EstimateDraft>().notNull(),
    revision: integer().notNull().default(0),
    /** The revision last sent; the draft has unsent changes when they differ. */
    sentRevision: integer(),
    withdrawnAt: timestamp({ withTimezone: true }),
    createdBy: uuid(),
    ...timestamps,
  },
  (t) => [
    unique('estimates_workshop_id_id').on(t.workshopId, t.id),
    unique('estimates_workshop_number').on(t.workshopId, t.number),
    foreignKey({ columns: [t.workshopId, t.jobId], foreignColumns: [jobs.workshopId, jobs.id] }).onDelete('restrict'),
    foreignKey({ columns: [t.workshopId, t.createdBy], foreignColumns: [staffUsers.workshopId, staffUsers.id] }).onDelete('restrict'),
    index('estimates_job').on(t.workshopId, t.jobId),
    check('estimates_number_positive', sql`${t.number} > 0`),
  ],
)

/** A sent, frozen version. Content never changes once written; the times record what happened to it. */
export const estimateVersions = pgTable(
  'estimate_versions',
  {
    id: id(),
    workshopId: uuid().notNull(),
    estimateId: uuid().notNull(),
    version: integer().notNull(),
    snapshot: jsonb().$type<EstimateSnapshot>().notNull(),
    /** SHA-256 (hex) of the snapshot's RFC 8785 canonical JSON. */
    hash: text().notNull(),
    proposedGross: integer().notNull(),
    expiresOn: date().notNull(),
    sentAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    sentBy: uuid(),
    supersededAt: timestamp({ withTimezone: true }),
    openedAt: timestamp({ withTimezone: true }),
    confirmedAt: timestamp({ withTimezone: true }),
  },
  (t) => [
    unique('estimate_versions_workshop_id_id').on(t.workshopId, t.id),
    unique('estimate_versions_estimate_version').on(t.estimateId, t.version),
    foreignKey({ columns: [t.workshopId, t.estimateId], foreignColumns: [estimates.workshopId, estimates.id] }).onDelete('restrict'),
    check('estimate_versions_hash_hex', sql`${t.hash} ~ '^[0-9a-f]{64}$'`),
  ],
)

export const itemDecision = pgEnum('item_decision', ['approved', 'declined', 'pending'])

/** The customer's current choice per item of one version; the confirmation freezes them. */
export const estimateDecisions = pgTable(
  'estimate_decisions',
  {
    workshopId: uuid().notNull(),
    versionId: uuid().notNull(),
    itemId: text().notNull(),
    decision: itemDecision().notNull(),
    decidedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    primaryKey({ columns: [t.versionId, t.itemId] }),
    foreignKey({ columns: [t.workshopId, t.versionId], foreignColumns: [estimateVersions.workshopId, estimateVersions.id] }).onDelete(
      'restrict',
    ),
  ],
)

export interface ConsentRecord {
  /** The customer asked for work to start within the cancellation period. */
  startWithinCancellationPeriod: boolean
  /** The customer read the cancellation information shown with the decision. */
  cancellationInformationShown: boolean
}

/** The decision record: what the customer saw, chose and agreed to. One per version. */
export const estimateConfirmations = pgTable(
  'estimate_confirmations',
  {
    id: id(),
    workshopId: uuid().notNull(),
    versionId: uuid().notNull(),
    customerId: uuid().notNull(),
    versionHash: text().notNull(),
    decisions: jsonb().$type<Record<string, 'approved' | 'declined'>>().notNull(),
    consents: jsonb().$type<ConsentRecord>().notNull(),
    result: jsonb().$type<EstimateResult>().notNull(),
    approvedGross: integer().notNull(),
    depositMinor: integer().notNull(),
    ip: inet(),
    userAgent: text(),
    confirmedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    unique('estimate_confirmations_workshop_id_id').on(t.workshopId, t.id),
    uniqueIndex('estimate_confirmations_one_per_version').on(t.versionId),
    foreignKey({ columns: [t.workshopId, t.versionId], foreignColumns: [estimateVersions.workshopId, estimateVersions.id] }).onDelete(
      'restrict',
    ),
    foreignKey({ columns: [t.workshopId, t.customerId], foreignColumns: [customers.workshopId, customers.id] }).onDelete('restrict'),
  ],
)

/** The customer's link to one version. Only the SHA-256 of the token is kept. */
export const estimateLinks = pgTable(
  'estimate_links',
  {
    id: id(),
    workshopId: uuid().notNull(),
    versionId: uuid().notNull(),
    customerId: uuid().notNull(),
    tokenHash: text().notNull(),
    expiresAt: timestamp({ withTimezone: true }).notNull(),
    revokedAt: timestamp({ withTimezone: true }),
    lastUsedAt: timestamp({ withTimezone: true }),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex('estimate_links_token_hash').on(t.tokenHash),
    foreignKey({ columns: [t.workshopId, t.versionId], foreignColumns: [estimateVersions.workshopId, estimateVersions.id] }).onDelete(
      'restrict',
    ),
    foreignKey({ columns: [t.workshopId, t.customerId], foreignColumns: [customers.workshopId, customers.id] }).onDelete('restrict'),
  ],
)

/** A customer's question on an item and the workshop's answer. */
export const estimateQuestions = pgTable(
  'estimate_questions',
  {
    id: id(),
    workshopId: uuid().notNull(),
    estimateId: uuid().notNull(),
    versionId: uuid().notNull(),
    itemId: text().notNull(),
    customerId: uuid().notNull(),
    question: text().notNull(),
    answer: text(),
    answeredBy: uuid(),
    askedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    answeredAt: timestamp({ withTimezone: true }),
  },
  (t) => [
    foreignKey({ columns: [t.workshopId, t.estimateId], foreignColumns: [estimates.workshopId, estimates.id] }).onDelete('restrict'),
    foreignKey({ columns: [t.workshopId, t.versionId], foreignColumns: [estimateVersions.workshopId, estimateVersions.id] }).onDelete(
      'restrict',
    ),
    foreignKey({ columns: [t.workshopId, t.answeredBy], foreignColumns: [staffUsers.workshopId, staffUsers.id] }).onDelete('restrict'),
    index('estimate_questions_estimate').on(t.workshopId, t.estimateId),
    check('estimate_questions_question_present', sql`length(trim(${t.question})) > 0`),
  ],
)

export const depositStatus = pgEnum('deposit_status', ['awaiting_payment', 'paid', 'refunded'])

/** A deposit asked for on a confirmation; paid only by the provider's signed webhook. */
export const depositPayments = pgTable(
  'deposit_payments',
  {
    id: id(),
    workshopId: uuid().notNull(),
    confirmationId: uuid().notNull(),
    amountMinor: integer().notNull(),
    currency: text().notNull(),
    status: depositStatus().notNull().default('awaiting_payment'),
    checkoutSessionId: text(),
    paymentIntentId: text(),
    paidAt: timestamp({ withTimezone: true }),
    refundId: text(),
    refundedMinor: integer(),
    refundedAt: timestamp({ withTimezone: true }),
    ...timestamps,
  },
  (t) => [
    uniqueIndex('deposit_payments_one_per_confirmation').on(t.confirmationId),
    uniqueIndex('deposit_payments_checkout_session').on(t.checkoutSessionId),
    foreignKey({
      columns: [t.workshopId, t.confirmationId],
      foreignColumns: [estimateConfirmations.workshopId, estimateConfirmations.id],
    }).onDelete('restrict'),
    check('deposit_payments_amount_positive', sql`${t.amountMinor} > 0`),
  ],
)

/** Each provider event id is handled once, whatever the number of deliveries. */
export const paymentEvents = pgTable('payment_events', {
  eventId: text().primaryKey(),
  type: text().notNull(),
  receivedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
})

export const emailStatus = pgEnum('email_status', ['queued', 'sent', 'failed'])

/** Every e-mail the product sends on the workshop's behalf, with what became of it. */
export const outboundEmails = pgTable(
  'outbound_emails',
  {
    id: id(),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    estimateId: uuid(),
    kind: text().notNull(),
    to: text().notNull(),
    subject: text().notNull(),
    /** Everything needed to build the message again (text, html, reply-to, attachments to render). */
    message: jsonb().$type<Record<string, unknown>>().notNull(),
    status: emailStatus().notNull().default('queued'),
    attempts: integer().notNull().default(0),
    lastError: text(),
    queuedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    sentAt: timestamp({ withTimezone: true }),
  },
  (t) => [
    foreignKey({ columns: [t.workshopId, t.estimateId], foreignColumns: [estimates.workshopId, estimates.id] }).onDelete('restrict'),
    index('outbound_emails_estimate').on(t.workshopId, t.estimateId),
  ],
)
