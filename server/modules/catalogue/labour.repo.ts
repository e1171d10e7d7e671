import { type SQL, and, asc, count, eq, getTableColumns, inArray, isNotNull, isNull, or, sql } from 'drizzle-orm'
import { alias } from 'drizzle-orm/pg-core'
import type { Database, Queryable, Tx } from '../../db/client'
import { accessStepIncludes, accessSteps, jobs, labourClockTimes, labourOperationAccessSteps, labourOperations } from '../../db/schema'
import { normalizeDecimal } from '../../../shared/decimal'
import type { LabourSearchQuery, TimeComparisonQuery } from '../../../shared/schemas/catalogue'
import { type Listed, chunks, fromExcluded, lockImports, rankedSearch } from './catalogue.repo'

export type OperationRow = typeof labourOperations.$inferSelect
/** An operation as lists and forms need it: without the search columns. */
export type OperationRecord = Listed<typeof labourOperations>
/** What the form and the import write of an operation. */
export type OperationValues = Pick<
  typeof labourOperations.$inferInsert,
  'code' | 'name' | 'synonyms' | 'system' | 'vehicleGroups' | 'side' | 'bookHours' | 'category' | 'notes'
>
export type StepRow = typeof accessSteps.$inferSelect
export type StepValues = Pick<typeof accessSteps.$inferInsert, 'code' | 'name' | 'hours'>
export type ClockTimeValues = typeof labourClockTimes.$inferInsert

export interface StepWithIncludes {
  row: StepRow
  includes: string[]
}

export function createLabourRepo(db: Database) {
  /** Access step codes of each operation, in their listed order. */
  async function stepCodesOf(tx: Queryable, workshopId: string, operationIds?: string[]): Promise<Map<string, string[]>> {
    if (operationIds && operationIds.length === 0) return new Map()
    const l = labourOperationAccessSteps
    const rows = await tx
      .select({ operationId: l.operationId, code: accessSteps.code })
      .from(l)
      .innerJoin(accessSteps, eq(accessSteps.id, l.accessStepId))
      .where(and(eq(l.workshopId, workshopId), operationIds ? inArray(l.operationId, operationIds) : undefined))
      .orderBy(asc(l.operationId), asc(l.position))
    const out = new Map<string, string[]>()
    for (const r of rows) out.set(r.operationId, [...(out.get(r.operationId) ?? []), r.code])
    return out
  }

  return {
    db,
    transaction: <T>(fn: (tx: Tx) => Promise<T>) => db.transaction(fn),
    lockImports,

    async operationsByCodes(workshopId: string, codes: string[]): Promise<OperationRecord[]> {
      const { searchText: _s, searchVector: _v, lookupKey: _k, ...columns } = getTableColumns(labourOperations)
      return db
        .select(columns)
        .from(labourOperations)
        .where(and(eq(labourOperations.workshopId, workshopId), inArray(labourOperations.code, codes), isNull(labourOperations.archivedAt)))
    },

    /** A page of operations with their access step codes in order (the search brings them in the same statement). */
    async search(
      workshopId: string,
      q: LabourSearchQuery,
    ): Promise<{ rows: OperationRecord[]; stepCodes: Map<string, string[]>; total: number }> {
      const o = labourOperations
      const where: SQL[] = [q.archived ? isNotNull(o.archivedAt) : isNull(o.archivedAt)]
      if (q.vehicleGroup) where.push(sql`(cardinality(${o.vehicleGroups}) = 0 or ${q.vehicleGroup} = any(${o.vehicleGroups}))`)
      if (q.system) where.push(eq(o.system, q.system))
      if (q.side) where.push(q.side === 'none' ? eq(o.side, 'none') : (or(eq(o.side, q.side), eq(o.side, 'none')) as SQL))
      const filters = and(...where) as SQL
      const offset = (q.page - 1) * q.pageSize

      if (q.q) {
        const l = labourOperationAccessSteps
        const stepCodes = sql`(select coalesce(array_agg(s.code order by l.position), '{}') from ${l} l join ${accessSteps} s on s.id = l.access_step_id where l.operation_id = ${o.id})`
        const found = await rankedSearch(db, {
          workshopId,
          source: 'labour',
          table: o,
          q: q.q,
          where: filters,
          sortName: sql`${o.name}`,
          extra: stepCodes,
          limit: q.pageSize,
          offset,
        })
        return {
          rows: found.rows,
          stepCodes: new Map(found.rows.map((r, i) => [r.id, (found.extras[i] as string[] | null) ?? []])),
          total: found.total,
        }
      }
      const scoped = and(eq(o.workshopId, workshopId), filters)
      const [rows, [total]] = await Promise.all([
        db.select().from(o).where(scoped).orderBy(asc(o.code)).limit(q.pageSize).offset(offset),
        db.select({ n: count() }).from(o).where(scoped),
      ])
      return {
        rows,
        stepCodes: await stepCodesOf(
          db,
          workshopId,
          rows.map((r) => r.id),
        ),
        total: total?.n ?? 0,
      }
    },

    async findOperation(workshopId: string, id: string) {
      const [row] = await db
        .select()
        .from(labourOperations)
        .where(and(eq(labourOperations.workshopId, workshopId), eq(labourOperations.id, id)))
      return row
    },

    async operationsByCode(tx: Queryable, workshopId: string): Promise<Map<string, OperationRow>> {
      const rows = await tx.select().from(labourOperations).where(eq(labourOperations.workshopId, workshopId))
      return new Map(rows.map((r) => [r.code, r]))
    },

    stepCodesOf,

    /** The workshop's whole access-step graph, each step with the codes it includes; a few hundred rows at most. */
    async steps(tx: Queryable, workshopId: string): Promise<StepWithIncludes[]> {
      const included = alias(accessSteps, 'included')
      const rows = await tx
        .select({
          row: accessSteps,
          includes: sql<
            string[]
          >`coalesce(array_agg(${included.code} order by ${included.code}) filter (where ${included.code} is not null), '{}')`,
        })
        .from(accessSteps)
        .leftJoin(accessStepIncludes, eq(accessStepIncludes.stepId, accessSteps.id))
        .leftJoin(included, eq(included.id, accessStepIncludes.includedStepId))
        .where(eq(accessSteps.workshopId, workshopId))
        .groupBy(accessSteps.id)
        .orderBy(asc(accessSteps.code))
      return rows
    },

    async stepUsage(workshopId: string): Promise<Map<string, number>> {
      const l = labourOperationAccessSteps
      const rows = await db
        .select({ stepId: l.accessStepId, n: count() })
        .from(l)
        .where(eq(l.workshopId, workshopId))
        .groupBy(l.accessStepId)
      return new Map(rows.map((r) => [r.stepId, r.n]))
    },

    /**
     * Operations whose access steps reach any of `stepIds`, directly or through includes, with what
     * they book and their steps' codes in order, for the access-time rule.
     */
    async bookedOperationsUsing(tx: Queryable, workshopId: string, stepIds: string[]) {
      if (stepIds.length === 0) return []
      const l = labourOperationAccessSteps
      const rows = await tx
        .selectDistinct({ id: labourOperations.id, code: labourOperations.code, bookHours: labourOperations.bookHours })
        .from(l)
        .innerJoin(labourOperations, eq(labourOperations.id, l.operationId))
        .where(and(eq(l.workshopId, workshopId), inArray(l.accessStepId, stepIds)))
      const stepCodes = await stepCodesOf(tx, workshopId)
      return rows.map((r) => ({ code: r.code, bookHours: normalizeDecimal(r.bookHours), steps: stepCodes.get(r.id) ?? [] }))
    },

    /** Replaces each step's includes with the given codes' ids. */
    async setIncludes(tx: Queryable, workshopId: string, edges: Map<string, string[]>, idOf: (code: string) => string) {
      const stepIds = [...edges.keys()]
      if (stepIds.length === 0) return
      await tx
        .delete(accessStepIncludes)
        .where(and(eq(accessStepIncludes.workshopId, workshopId), inArray(accessStepIncludes.stepId, stepIds)))
      const values = [...edges].flatMap(([stepId, codes]) => codes.map((code) => ({ workshopId, stepId, includedStepId: idOf(code) })))
      for (const chunk of chunks(values, 5000)) await tx.insert(accessStepIncludes).values(chunk)
    },

    /** Replaces each operation's access steps with the given codes' ids, in order. */
    async setOperationSteps(tx: Queryable, workshopId: string, steps: Map<string, string[]>, idOf: (code: string) => string) {
      const operationIds = [...steps.keys()]
      if (operationIds.length === 0) return
      for (const ids of chunks(operationIds, 5000)) {
        await tx
          .delete(labourOperationAccessSteps)
          .where(and(eq(labourOperationAccessSteps.workshopId, workshopId), inArray(labourOperationAccessSteps.operationId, ids)))
      }
      const values = [...steps].flatMap(([operationId, codes]) =>
        codes.map((code, position) => ({ workshopId, operationId, accessStepId: idOf(code), position })),
      )
      for (const chunk of chunks(values, 5000)) await tx.insert(labourOperationAccessSteps).values(chunk)
    },

    /** Inserts the operation, or updates it when `id` is given; the id, or undefined when there is no such operation. */
    async saveOperation(tx: Queryable, workshopId: string, id: string | null, values: OperationValues): Promise<string | undefined> {
      const o = labourOperations
      const [row] = id
        ? await tx
            .update(o)
            .set(values)
            .where(and(eq(o.workshopId, workshopId), eq(o.id, id)))
            .returning({ id: o.id })
        : await tx
            .insert(o)
            .values({ workshopId, ...values })
            .returning({ id: o.id })
      return row?.id
    },

    async setOperationArchived(workshopId: string, id: string, archived: boolean): Promise<boolean> {
      const rows = await db
        .update(labourOperations)
        .set({ archivedAt: archived ? new Date() : null })
        .where(and(eq(labourOperations.workshopId, workshopId), eq(labourOperations.id, id)))
        .returning({ id: labourOperations.id })
      return rows.length > 0
    },

    /** Inserts new codes and overwrites existing ones, matched on the code; the id of each code written. */
    async upsertOperations(tx: Queryable, workshopId: string, values: OperationValues[]): Promise<Map<string, string>> {
      const ids = new Map<string, string>()
      for (const chunk of chunks(values, 1000)) {
        const saved = await tx
          .insert(labourOperations)
          .values(chunk.map((v) => ({ workshopId, ...v })))
          .onConflictDoUpdate({
            target: [labourOperations.workshopId, labourOperations.code],
            set: fromExcluded(labourOperations, ['name', 'synonyms', 'system', 'vehicleGroups', 'side', 'bookHours', 'category', 'notes']),
          })
          .returning({ id: labourOperations.id, code: labourOperations.code })
        for (const s of saved) ids.set(s.code, s.id)
      }
      return ids
    },

    /** Inserts the step, or updates it when `id` is given; the id, or undefined when there is no such step. */
    async saveStep(tx: Queryable, workshopId: string, id: string | null, values: StepValues): Promise<string | undefined> {
      const [row] = id
        ? await tx
            .update(accessSteps)
            .set(values)
            .where(and(eq(accessSteps.workshopId, workshopId), eq(accessSteps.id, id)))
            .returning({ id: accessSteps.id })
        : await tx
            .insert(accessSteps)
            .values({ workshopId, ...values })
            .returning({ id: accessSteps.id })
      return row?.id
    },

    /** Inserts new codes and overwrites existing ones, matched on the code. */
    async upsertSteps(tx: Queryable, workshopId: string, values: StepValues[]): Promise<void> {
      for (const chunk of chunks(values, 2000)) {
        await tx
          .insert(accessSteps)
          .values(chunk.map((v) => ({ workshopId, ...v })))
          .onConflictDoUpdate({
            target: [accessSteps.workshopId, accessSteps.code],
            set: fromExcluded(accessSteps, ['name', 'hours']),
          })
      }
    },

    async deleteStep(workshopId: string, id: string): Promise<boolean> {
      const rows = await db
        .delete(accessSteps)
        .where(and(eq(accessSteps.workshopId, workshopId), eq(accessSteps.id, id)))
        .returning({ id: accessSteps.id })
      return rows.length > 0
    },

    async jobExists(workshopId: string, jobId: string) {
      const [row] = await db
        .select({ id: jobs.id })
        .from(jobs)
        .where(and(eq(jobs.workshopId, workshopId), eq(jobs.id, jobId)))
      return Boolean(row)
    },

    async insertClockTime(values: ClockTimeValues) {
      const [row] = await db.insert(labourClockTimes).values(values).returning()
      if (!row) throw new Error('clock time insert returned nothing')
      return row
    },

    /**
     * Book time against the median of the recorded times, per operation. percentile_cont works in
     * double precision; the median of two-place values has at most three places, which a double
     * holds exactly enough for the rounding to hundredths that follows.
     */
    async timeComparison(workshopId: string, q: TimeComparisonQuery) {
      const c = labourClockTimes
      const o = labourOperations
      return db
        .select({
          operationId: o.id,
          code: o.code,
          name: o.name,
          system: o.system,
          bookHours: o.bookHours,
          medianHours: sql<string>`round((percentile_cont(0.5) within group (order by ${c.hours}))::numeric, 2)::text`,
          count: sql<number>`count(*)::int`,
        })
        .from(c)
        .innerJoin(o, and(eq(o.workshopId, c.workshopId), eq(o.id, c.operationId)))
        .where(and(eq(c.workshopId, workshopId), q.system ? eq(o.system, q.system) : undefined))
        .groupBy(o.id)
        .orderBy(asc(o.code))
    },
  }
}

export type LabourRepo = ReturnType<typeof createLabourRepo>
