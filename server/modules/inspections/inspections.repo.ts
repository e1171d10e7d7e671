import { and, asc, desc, eq, inArray, isNull, or } from 'drizzle-orm'
import type { Database, Queryable, Tx } from '../../db/client'
import { checkTemplates, findings, inspectionResults, inspections, jobs, photos, staffUsers, vehicles } from '../../db/schema'
import { setJobStatus } from '../jobs/jobs.repo'

type Db = Queryable

export type TemplateRow = typeof checkTemplates.$inferSelect
export type InspectionRow = typeof inspections.$inferSelect
export type ResultRow = typeof inspectionResults.$inferSelect
export type FindingRow = typeof findings.$inferSelect
export type PhotoRow = typeof photos.$inferSelect
export type PhotoValues = typeof photos.$inferInsert

export function createInspectionsRepo(db: Database) {
  return {
    transaction: <T>(fn: (tx: Tx) => Promise<T>) => db.transaction(fn),
    setJobStatus,

    templates(workshopId: string) {
      return db
        .select()
        .from(checkTemplates)
        .where(and(eq(checkTemplates.workshopId, workshopId), isNull(checkTemplates.archivedAt)))
        .orderBy(asc(checkTemplates.name))
    },
    async template(workshopId: string, id: string) {
      const [row] = await db
        .select()
        .from(checkTemplates)
        .where(and(eq(checkTemplates.workshopId, workshopId), eq(checkTemplates.id, id)))
      return row
    },
    /** The template for a vehicle group, else one for every group. */
    async templateForGroup(workshopId: string, group: string | null) {
      const rows = await db
        .select()
        .from(checkTemplates)
        .where(
          and(
            eq(checkTemplates.workshopId, workshopId),
            isNull(checkTemplates.archivedAt),
            or(isNull(checkTemplates.vehicleGroup), group ? eq(checkTemplates.vehicleGroup, group) : isNull(checkTemplates.vehicleGroup)),
          ),
        )
        .orderBy(desc(checkTemplates.updatedAt))
      return rows.find((r) => r.vehicleGroup === group && group !== null) ?? rows.find((r) => r.vehicleGroup === null)
    },
    async insertTemplate(values: typeof checkTemplates.$inferInsert) {
      const [row] = await db.insert(checkTemplates).values(values).returning()
      if (!row) throw new Error('template insert returned nothing')
      return row
    },
    async updateTemplate(workshopId: string, id: string, values: Partial<typeof checkTemplates.$inferInsert>) {
      const [row] = await db
        .update(checkTemplates)
        .set(values)
        .where(and(eq(checkTemplates.workshopId, workshopId), eq(checkTemplates.id, id)))
        .returning()
      return row
    },

    async job(workshopId: string, jobId: string) {
      const [row] = await db
        .select({ job: jobs, vehicleGroup: vehicles.vehicleGroup })
        .from(jobs)
        .innerJoin(vehicles, eq(vehicles.id, jobs.vehicleId))
        .where(and(eq(jobs.workshopId, workshopId), eq(jobs.id, jobId)))
      return row
    },

    async inspection(workshopId: string, id: string) {
      const [row] = await db
        .select({ inspection: inspections, technicianName: staffUsers.name })
        .from(inspections)
        .leftJoin(staffUsers, eq(staffUsers.id, inspections.technicianId))
        .where(and(eq(inspections.workshopId, workshopId), eq(inspections.id, id)))
      return row
    },
    inspectionsOfJob(workshopId: string, jobId: string) {
      return db
        .select({ inspection: inspections, technicianName: staffUsers.name })
        .from(inspections)
        .leftJoin(staffUsers, eq(staffUsers.id, inspections.technicianId))
        .where(and(eq(inspections.workshopId, workshopId), eq(inspections.jobId, jobId)))
        .orderBy(desc(inspections.startedAt))
    },
    async insertInspection(tx: Db, values: typeof inspections.$inferInsert) {
      const [row] = await tx.insert(inspections).values(values).returning()
      if (!row) throw new Error('inspection insert returned nothing')
      return row
    },
    async updateInspection(workshopId: string, id: string, values: Partial<typeof inspections.$inferInsert>, tx: Db = db) {
      const [row] = await tx
        .update(inspections)
        .set(values)
        .where(and(eq(inspections.workshopId, workshopId), eq(inspections.id, id)))
        .returning()
      return row
    },
    results(workshopId: string, inspectionId: string) {
      return db
        .select()
        .from(inspectionResults)
        .where(and(eq(inspectionResults.workshopId, workshopId), eq(inspectionResults.inspectionId, inspectionId)))
        .orderBy(asc(inspectionResults.recordedAt))
    },
    async upsertResult(tx: Db, values: typeof inspectionResults.$inferInsert) {
      const [row] = await tx
        .insert(inspectionResults)
        .values(values)
        .onConflictDoUpdate({
          target: [inspectionResults.inspectionId, inspectionResults.checkCode, inspectionResults.position],
          set: {
            value: values.value,
            suggestedSeverity: values.suggestedSeverity,
            detail: values.detail,
            note: values.note,
            recordedBy: values.recordedBy,
            recordedAt: new Date(),
          },
        })
        .returning()
      if (!row) throw new Error('result upsert returned nothing')
      return row
    },

    findingsOfJob(workshopId: string, jobId: string) {
      return db
        .select()
        .from(findings)
        .where(and(eq(findings.workshopId, workshopId), eq(findings.jobId, jobId)))
        .orderBy(asc(findings.createdAt))
    },
    async finding(workshopId: string, id: string, tx: Db = db) {
      const [row] = await tx
        .select()
        .from(findings)
        .where(and(eq(findings.workshopId, workshopId), eq(findings.id, id)))
      return row
    },
    async findingOfResult(tx: Db, resultId: string) {
      const [row] = await tx.select().from(findings).where(eq(findings.resultId, resultId))
      return row
    },
    async insertFinding(tx: Db, values: typeof findings.$inferInsert) {
      const [row] = await tx.insert(findings).values(values).returning()
      if (!row) throw new Error('finding insert returned nothing')
      return row
    },
    async updateFinding(tx: Db, workshopId: string, id: string, values: Partial<typeof findings.$inferInsert>) {
      const [row] = await tx
        .update(findings)
        .set(values)
        .where(and(eq(findings.workshopId, workshopId), eq(findings.id, id)))
        .returning()
      return row
    },
    async deleteFinding(tx: Db, workshopId: string, id: string) {
      const rows = await tx
        .delete(findings)
        .where(and(eq(findings.workshopId, workshopId), eq(findings.id, id)))
        .returning({ id: findings.id })
      return rows.length > 0
    },

    photosOf(workshopId: string, findingIds: string[]) {
      if (findingIds.length === 0) return Promise.resolve([])
      return db
        .select()
        .from(photos)
        .where(and(eq(photos.workshopId, workshopId), inArray(photos.findingId, findingIds)))
        .orderBy(asc(photos.createdAt))
    },
    async photo(workshopId: string, id: string) {
      const [row] = await db
        .select()
        .from(photos)
        .where(and(eq(photos.workshopId, workshopId), eq(photos.id, id)))
      return row
    },
    async insertPhotos(tx: Db, values: PhotoValues[]) {
      return tx.insert(photos).values(values).returning()
    },
    async deletePhoto(workshopId: string, id: string) {
      const [row] = await db
        .delete(photos)
        .where(and(eq(photos.workshopId, workshopId), eq(photos.id, id)))
        .returning()
      return row
    },
  }
}

export type InspectionsRepo = ReturnType<typeof createInspectionsRepo>
