import { sql } from 'drizzle-orm'
import { check, foreignKey, index, integer, jsonb, pgEnum, pgTable, text, timestamp, unique, uniqueIndex, uuid } from 'drizzle-orm/pg-core'
import type { Explanation, ResultValue, SafetyCheck, SuggestedRepair, TemplateDefinition } from '../../../shared/schemas/inspections'
import { id, timestamps } from './columns'
import { jobs } from './jobs'
import { staffUsers } from './staff'
import { workshops } from './workshops'

export const severity = pgEnum('severity', ['urgent', 'soon', 'watch', 'ok'])
export const position = pgEnum('position', ['left', 'right', 'front', 'rear', 'none'])
export const inspectionStatus = pgEnum('inspection_status', ['safety', 'in_progress', 'finished'])

/** A check list as data (shared/schemas/inspections.ts TemplateDefinition), per vehicle group. */
export const checkTemplates = pgTable(
  'check_templates',
  {
    id: id(),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    name: text().notNull(),
    vehicleGroup: text(),
    definition: jsonb().$type<TemplateDefinition>().notNull(),
    basedOnId: uuid(),
    archivedAt: timestamp({ withTimezone: true }),
    ...timestamps,
  },
  (t) => [
    unique('check_templates_workshop_id_id').on(t.workshopId, t.id),
    check('check_templates_name_present', sql`length(trim(${t.name})) > 0`),
  ],
)

export const inspections = pgTable(
  'inspections',
  {
    id: id(),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    jobId: uuid().notNull(),
    templateId: uuid(),
    /** The check list as it was when the inspection began, so later template edits change nothing here. */
    templateName: text().notNull(),
    definition: jsonb().$type<TemplateDefinition>().notNull(),
    status: inspectionStatus().notNull().default('safety'),
    safety: jsonb().$type<SafetyCheck>(),
    technicianId: uuid(),
    notes: text().notNull().default(''),
    startedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    finishedAt: timestamp({ withTimezone: true }),
    ...timestamps,
  },
  (t) => [
    unique('inspections_workshop_id_id').on(t.workshopId, t.id),
    foreignKey({ columns: [t.workshopId, t.jobId], foreignColumns: [jobs.workshopId, jobs.id] }).onDelete('restrict'),
    foreignKey({ columns: [t.workshopId, t.templateId], foreignColumns: [checkTemplates.workshopId, checkTemplates.id] }).onDelete(
      'restrict',
    ),
    foreignKey({ columns: [t.workshopId, t.technicianId], foreignColumns: [staffUsers.workshopId, staffUsers.id] }).onDelete('restrict'),
    index('inspections_job').on(t.jobId),
    check('inspections_finished_after_start', sql`${t.finishedAt} is null or ${t.finishedAt} >= ${t.startedAt}`),
  ],
)

export const inspectionResults = pgTable(
  'inspection_results',
  {
    id: id(),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    inspectionId: uuid().notNull(),
    checkCode: text().notNull(),
    position: position().notNull(),
    value: jsonb().$type<ResultValue>().notNull(),
    suggestedSeverity: severity(),
    detail: text().notNull(),
    note: text(),
    recordedBy: uuid(),
    recordedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    foreignKey({ columns: [t.workshopId, t.inspectionId], foreignColumns: [inspections.workshopId, inspections.id] }).onDelete('cascade'),
    foreignKey({ columns: [t.workshopId, t.recordedBy], foreignColumns: [staffUsers.workshopId, staffUsers.id] }).onDelete('restrict'),
    uniqueIndex('inspection_results_one_per_check').on(t.inspectionId, t.checkCode, t.position),
    unique('inspection_results_workshop_id_id').on(t.workshopId, t.id),
  ],
)

export const findings = pgTable(
  'findings',
  {
    id: id(),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    jobId: uuid().notNull(),
    inspectionId: uuid(),
    /** Set when the finding came from a failed check; a free finding has none. */
    resultId: uuid(),
    checkCode: text(),
    position: position().notNull().default('none'),
    title: text().notNull(),
    severity: severity().notNull(),
    explanation: jsonb().$type<Explanation>().notNull(),
    measurement: text(),
    suggestedRepair: jsonb().$type<SuggestedRepair>().notNull().default({ labour: [], parts: [] }),
    reviewedAt: timestamp({ withTimezone: true }),
    reviewedBy: uuid(),
    createdBy: uuid(),
    ...timestamps,
  },
  (t) => [
    unique('findings_workshop_id_id').on(t.workshopId, t.id),
    foreignKey({ columns: [t.workshopId, t.jobId], foreignColumns: [jobs.workshopId, jobs.id] }).onDelete('restrict'),
    foreignKey({ columns: [t.workshopId, t.inspectionId], foreignColumns: [inspections.workshopId, inspections.id] }).onDelete('restrict'),
    foreignKey({ columns: [t.workshopId, t.resultId], foreignColumns: [inspectionResults.workshopId, inspectionResults.id] }).onDelete(
      'restrict',
    ),
    uniqueIndex('findings_one_per_result').on(t.resultId),
    index('findings_job').on(t.jobId),
    check('findings_title_present', sql`length(trim(${t.title})) > 0`),
  ],
)

/** Re-encoded, metadata-free images; the files live in the storage behind server/lib/storage.ts. */
export const photos = pgTable(
  'photos',
  {
    id: id(),
    workshopId: uuid()
      .notNull()
      .references(() => workshops.id, { onDelete: 'restrict' }),
    findingId: uuid().notNull(),
    storageKey: text().notNull(),
    thumbKey: text().notNull(),
    contentType: text().notNull(),
    width: integer().notNull(),
    height: integer().notNull(),
    bytes: integer().notNull(),
    uploadedBy: uuid(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    foreignKey({ columns: [t.workshopId, t.findingId], foreignColumns: [findings.workshopId, findings.id] }).onDelete('cascade'),
    index('photos_finding').on(t.findingId),
    check('photos_content_type', sql`${t.contentType} in ('image/jpeg', 'image/png', 'image/webp')`),
  ],
)
