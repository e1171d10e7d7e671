import { sql } from 'drizzle-orm'
import {
  check,
  customType,
  foreignKey,
  index,
  integer,
  numeric,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  timestamp,
  unique,
  uuid,
} from 'drizzle-orm/pg-core'
import { id, timestamps } from './columns'
import { jobs } from './jobs'
import { staffUsers } from './staff'
import { workshops } from './workshops'

/**
 * The labour-time table and parts catalogue. search_text, search_vector and lookup_key are
 * filled by triggers (migration catalogue_search) so every write path — forms, imports, the
 * seed — indexes rows the same way; the GIN indexes that search them live there too, because
 * they need the pg_trgm and btree_gin extensions.
 */
const tsvector = customType<{ data: string }>({ dataType: () => 'tsvector' })

const searchColumns = {
  searchText: text().notNull().default(''),
  searchVector: tsvector()
    .notNull()
    .default(sql`''::tsvector`),
  lookupKey: text().notNull().default(''),
}

export const labourSystem = pgEnum('labour_system', ['front_axle', 'rear_axle', 'prop_shafts', 'transfer_box', 'steering', 'hubs_bearings'])
export const labourSide = pgEnum('labour_side', ['left', 'right', 'both', 'none'])
export const labourCategory = pgEnum('labour_category', ['standard', 'diagnostic', 'specialist'])

/** Hours: tenths are the trade's unit, hundredths allowed. */
const hours = () => numeric({ precision: 6, scale: 2 })

export const accessSteps = pgTable(
  'access_steps',
  {
    id: id(),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    code: text().notNull(),
    name: text().notNull(),
    /** The step's own time, without the steps it includes. */
    hours: hours().notNull(),
    ...timestamps,
  },
  (t) => [
    unique('access_steps_workshop_id_id').on(t.workshopId, t.id),
    unique('access_steps_workshop_code').on(t.workshopId, t.code),
    check('access_steps_code_present', sql`length(trim(${t.code})) > 0`),
    check('access_steps_name_present', sql`length(trim(${t.name})) > 0`),
    check('access_steps_hours_range', sql`${t.hours} >= 0`),
  ],
)

/** Edges of the access-step graph; the service refuses an edge that would close a loop. */
export const accessStepIncludes = pgTable(
  'access_step_includes',
  {
    workshopId: uuid().notNull(),
    stepId: uuid().notNull(),
    includedStepId: uuid().notNull(),
  },
  (t) => [
    primaryKey({ columns: [t.stepId, t.includedStepId] }),
    foreignKey({ columns: [t.workshopId, t.stepId], foreignColumns: [accessSteps.workshopId, accessSteps.id] }).onDelete('cascade'),
    // A step another step includes cannot be deleted out from under it.
    foreignKey({ columns: [t.workshopId, t.includedStepId], foreignColumns: [accessSteps.workshopId, accessSteps.id] }).onDelete(
      'restrict',
    ),
    index('access_step_includes_included').on(t.workshopId, t.includedStepId),
    check('access_step_includes_not_itself', sql`${t.stepId} <> ${t.includedStepId}`),
  ],
)

export const labourOperations = pgTable(
  'labour_operations',
  {
    id: id(),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    code: text().notNull(),
    name: text().notNull(),
    synonyms: text()
      .array()
      .notNull()
      .default(sql`'{}'::text[]`),
    system: labourSystem().notNull(),
    /** Vehicle group codes the time applies to; empty means every group. */
    vehicleGroups: text()
      .array()
      .notNull()
      .default(sql`'{}'::text[]`),
    side: labourSide().notNull(),
    /** Book time, including the time of the operation's access steps. */
    bookHours: hours().notNull(),
    category: labourCategory().notNull(),
    notes: text(),
    archivedAt: timestamp({ withTimezone: true }),
    ...searchColumns,
    ...timestamps,
  },
  (t) => [
    unique('labour_operations_workshop_id_id').on(t.workshopId, t.id),
    unique('labour_operations_workshop_code').on(t.workshopId, t.code),
    check('labour_operations_code_present', sql`length(trim(${t.code})) > 0`),
    check('labour_operations_name_present', sql`length(trim(${t.name})) > 0`),
    check('labour_operations_hours_positive', sql`${t.bookHours} > 0`),
  ],
)

export const labourOperationAccessSteps = pgTable(
  'labour_operation_access_steps',
  {
    workshopId: uuid().notNull(),
    operationId: uuid().notNull(),
    accessStepId: uuid().notNull(),
    /** Keeps the order the steps are listed in, which is the order they are done. */
    position: integer().notNull(),
  },
  (t) => [
    primaryKey({ columns: [t.operationId, t.accessStepId] }),
    foreignKey({ columns: [t.workshopId, t.operationId], foreignColumns: [labourOperations.workshopId, labourOperations.id] }).onDelete(
      'cascade',
    ),
    foreignKey({ columns: [t.workshopId, t.accessStepId], foreignColumns: [accessSteps.workshopId, accessSteps.id] }).onDelete('restrict'),
    index('labour_operation_access_steps_step').on(t.workshopId, t.accessStepId),
  ],
)

export const parts = pgTable(
  'parts',
  {
    id: id(),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    partNumber: text().notNull(),
    description: text().notNull(),
    supplierRef: text(),
    costMinor: integer().notNull(),
    /** A fixed sell price; null means the price comes from the workshop's markup bands. */
    sellPriceMinor: integer(),
    taxRate: numeric({ precision: 5, scale: 2 }).notNull(),
    /** Null when the workshop does not keep count of this part. */
    stockQuantity: integer(),
    archivedAt: timestamp({ withTimezone: true }),
    ...searchColumns,
    ...timestamps,
  },
  (t) => [
    unique('parts_workshop_id_id').on(t.workshopId, t.id),
    unique('parts_workshop_part_number').on(t.workshopId, t.partNumber),
    check('parts_part_number_present', sql`length(trim(${t.partNumber})) > 0`),
    check('parts_description_present', sql`length(trim(${t.description})) > 0`),
    check('parts_cost_range', sql`${t.costMinor} >= 0`),
    check('parts_sell_price_range', sql`${t.sellPriceMinor} is null or ${t.sellPriceMinor} >= 0`),
    check('parts_tax_rate_range', sql`${t.taxRate} >= 0 and ${t.taxRate} <= 100`),
    check('parts_stock_range', sql`${t.stockQuantity} is null or ${t.stockQuantity} >= 0`),
  ],
)

/** One row per workshop; absent until the owner first saves pricing. Null rates are not set yet. */
export const workshopPricing = pgTable(
  'workshop_pricing',
  {
    workshopId: uuid()
      .primaryKey()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    standardRateMinor: integer(),
    diagnosticRateMinor: integer(),
    specialistRateMinor: integer(),
    defaultTaxRate: numeric({ precision: 5, scale: 2 }).notNull(),
    updatedAt: timestamp({ withTimezone: true })
      .notNull()
      .defaultNow()
      .$onUpdate(() => new Date()),
  },
  (t) => [
    check(
      'workshop_pricing_rates_range',
      sql`coalesce(${t.standardRateMinor}, 0) >= 0 and coalesce(${t.diagnosticRateMinor}, 0) >= 0 and coalesce(${t.specialistRateMinor}, 0) >= 0`,
    ),
    check('workshop_pricing_tax_range', sql`${t.defaultTaxRate} >= 0 and ${t.defaultTaxRate} <= 100`),
  ],
)

/** A band applies from its cost up to the next band's; the first band starts at zero. */
export const markupBands = pgTable(
  'markup_bands',
  {
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    fromCostMinor: integer().notNull(),
    markupPercent: numeric({ precision: 7, scale: 2 }).notNull(),
  },
  (t) => [
    primaryKey({ columns: [t.workshopId, t.fromCostMinor] }),
    check('markup_bands_from_range', sql`${t.fromCostMinor} >= 0`),
    check('markup_bands_percent_range', sql`${t.markupPercent} >= 0`),
  ],
)

/** What a job really took, against the book time, so the shop can adjust its own times. */
export const labourClockTimes = pgTable(
  'labour_clock_times',
  {
    id: id(),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    operationId: uuid().notNull(),
    jobId: uuid(),
    technicianId: uuid().notNull(),
    hours: hours().notNull(),
    recordedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    foreignKey({ columns: [t.workshopId, t.operationId], foreignColumns: [labourOperations.workshopId, labourOperations.id] }).onDelete(
      'restrict',
    ),
    foreignKey({ columns: [t.workshopId, t.technicianId], foreignColumns: [staffUsers.workshopId, staffUsers.id] }).onDelete('restrict'),
    foreignKey({ columns: [t.workshopId, t.jobId], foreignColumns: [jobs.workshopId, jobs.id] }).onDelete('restrict'),
    index('labour_clock_times_operation').on(t.workshopId, t.operationId),
    check('labour_clock_times_hours_positive', sql`${t.hours} > 0`),
  ],
)

export const catalogueWordSource = pgEnum('catalogue_word_source', ['labour', 'parts'])

/**
 * Every word in a workshop's operations or parts, kept by triggers (migration catalogue_search).
 * A search word found nowhere here is likely a typo; its nearest words by trigram similarity
 * are searched for as well.
 */
export const catalogueWords = pgTable(
  'catalogue_words',
  {
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    source: catalogueWordSource().notNull(),
    word: text().notNull(),
  },
  (t) => [primaryKey({ columns: [t.workshopId, t.source, t.word] })],
)
