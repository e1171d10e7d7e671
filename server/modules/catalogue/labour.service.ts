import type { Request } from 'express'
import { and, eq, sql } from 'drizzle-orm'
import { accessSteps, labourOperations } from '../../db/schema'
import { auditContextOf, recordAudit } from '../../lib/audit'
import { deleteOrRefuse } from '../../lib/db-errors'
import { type ErrorIssue, NotFoundError, ValidationError } from '../../lib/errors'
import { accessHours, findLoop } from '../../../shared/catalogue/access-graph'
import { normalizeDecimal, toHundredths } from '../../../shared/catalogue/decimal'
import { labourPrice } from '../../../shared/catalogue/pricing'
import type { StaffPrincipal } from '../../../shared/schemas/auth'
import type {
  AccessStep,
  AccessStepInput,
  ClockTime,
  ClockTimeInput,
  ImportIssue,
  ImportReport,
  LabourOperation,
  LabourOperationInput,
  LabourSearchQuery,
  Pricing,
  TimeComparisonQuery,
  TimeComparisonRow,
} from '../../../shared/schemas/catalogue'
import type { Page } from '../../../shared/schemas/common'
import { guardText, joinList, writeCsv } from './catalogue.csv'
import { type ImportTable, type PlannedRow, planImport, reportOf } from './catalogue.import'
import { codeTaken, lockImports, refuseImport } from './catalogue.shared'
import { operationTable, operationTemplateRow, stepTable, stepTemplateRow } from './labour.import'
import { type LabourRepo, type OperationRecord, type Queryable, type StepWithIncludes, chunks } from './labour.repo'
import type { PricingRepo } from './pricing.repo'

interface GraphStep {
  id: string
  code: string
  name: string
  hours: string
  includes: string[]
}
type Graph = Map<string, GraphStep>

const graphOf = (steps: StepWithIncludes[]): Graph =>
  new Map(
    steps.map((s) => [
      s.row.code,
      { id: s.row.id, code: s.row.code, name: s.row.name, hours: normalizeDecimal(s.row.hours), includes: s.includes },
    ]),
  )

const inputOf = (row: OperationRecord, stepCodes: string[]): LabourOperationInput => ({
  code: row.code,
  name: row.name,
  synonyms: row.synonyms,
  system: row.system,
  vehicleGroups: row.vehicleGroups,
  side: row.side,
  bookHours: normalizeDecimal(row.bookHours),
  category: row.category,
  accessSteps: stepCodes,
  notes: row.notes,
})

/** Book time includes access time, so access may not take longer than the whole operation. */
function bookTimeIssue(bookHours: string, stepCodes: string[], graph: Graph): string | null {
  const access = accessHours(stepCodes, graph)
  if (toHundredths(access) <= toHundredths(bookHours)) return null
  return `The access steps take ${access} h, more than the book time of ${normalizeDecimal(bookHours)} h (book time includes access).`
}

function operationIssues(input: LabourOperationInput, graph: Graph): { field: string; message: string }[] {
  const unknown = input.accessSteps.filter((c) => !graph.has(c))
  if (unknown.length > 0)
    return [
      {
        field: 'accessSteps',
        message: `No access step with the code ${unknown.map((c) => `"${c}"`).join(', ')}. Add it under Access steps first.`,
      },
    ]
  const duplicate = input.accessSteps.find((c, i) => input.accessSteps.indexOf(c) !== i)
  if (duplicate) return [{ field: 'accessSteps', message: `"${duplicate}" is listed twice.` }]
  const tooLong = bookTimeIssue(input.bookHours, input.accessSteps, graph)
  return tooLong ? [{ field: 'bookHours', message: tooLong }] : []
}

const loopMessage = (loop: string[]) => `Access steps cannot include each other in a loop: ${loop.join(' → ')}.`

/**
 * The graph after `changes`, checked: includes name known steps, no loops, and every operation
 * still books at least its access time. Issues carry the code of the step they belong to.
 */
function stepGraphIssues(graph: Graph, changes: AccessStepInput[], operations: { code: string; bookHours: string; steps: string[] }[]) {
  const next: Graph = new Map(graph)
  for (const c of changes)
    next.set(c.code, { id: graph.get(c.code)?.id ?? '', code: c.code, name: c.name, hours: c.hours, includes: c.includes })
  const issues: { code: string; field: 'includes' | 'hours'; message: string }[] = []
  for (const c of changes) {
    const unknown = c.includes.filter((code) => !next.has(code))
    if (unknown.length > 0)
      issues.push({ code: c.code, field: 'includes', message: `No access step with the code ${unknown.map((u) => `"${u}"`).join(', ')}.` })
    if (c.includes.includes(c.code)) issues.push({ code: c.code, field: 'includes', message: 'A step cannot include itself.' })
  }
  if (issues.length > 0) return issues
  const loop = findLoop([...next.values()])
  if (loop) {
    const changed = new Set(changes.map((c) => c.code))
    const owner = loop.find((code) => changed.has(code)) ?? loop[0] ?? ''
    // Told from the step being changed: "WHEEL → HUB → WHEEL" when WHEEL was just told to include HUB.
    const start = loop.indexOf(owner)
    const fromOwner = [...loop.slice(start, -1), ...loop.slice(0, start), owner]
    return [{ code: owner, field: 'includes' as const, message: loopMessage(fromOwner) }]
  }
  const changedCodes = new Set(changes.map((c) => c.code))
  for (const op of operations) {
    const problem = bookTimeIssue(op.bookHours, op.steps, next)
    if (!problem) continue
    // Charged to a changed step the operation reaches, so the owner sees which change causes it.
    const culprit = [...changedCodes].find((code) => accessHours(op.steps, next) !== accessHours(op.steps, withoutStep(next, code)))
    issues.push({
      code: culprit ?? changes[0]?.code ?? '',
      field: 'hours',
      message: `Operation ${op.code} would book less than its access time: ${problem}`,
    })
  }
  return issues
}

const withoutStep = (graph: Graph, code: string): Graph => {
  const copy = new Map(graph)
  const step = copy.get(code)
  if (step) copy.set(code, { ...step, hours: '0' })
  return copy
}

const bodyIssues = (issues: { field: string; message: string }[]): ErrorIssue[] =>
  issues.map((i) => ({ path: ['body', i.field], message: i.message }))

export function createLabourService(deps: { repo: LabourRepo; pricing: PricingRepo }) {
  const { repo, pricing } = deps
  const db = repo.db

  function toOperation(row: OperationRecord, stepCodes: string[], graph: Graph, price: Pricing): LabourOperation {
    const rateMinor = price.rates[row.category]
    const bookHours = normalizeDecimal(row.bookHours)
    return {
      id: row.id,
      code: row.code,
      name: row.name,
      synonyms: row.synonyms,
      system: row.system,
      vehicleGroups: row.vehicleGroups,
      side: row.side,
      bookHours,
      category: row.category,
      notes: row.notes,
      accessSteps: stepCodes.flatMap((code) => {
        const s = graph.get(code)
        return s ? [{ code: s.code, name: s.name, hours: s.hours, includes: s.includes }] : []
      }),
      accessHours: accessHours(stepCodes, graph),
      rateMinor,
      priceMinor: labourPrice(rateMinor, bookHours, price.currency),
      currency: price.currency,
      archived: row.archivedAt !== null,
    }
  }

  /** `stepCodes` comes with a search's results; otherwise it is looked up. The step graph is read only when a row needs it. */
  async function present(workshopId: string, rows: OperationRecord[], known?: Map<string, string[]>): Promise<LabourOperation[]> {
    if (rows.length === 0) return []
    const stepCodes =
      known ??
      (await repo.stepCodesOf(
        db,
        workshopId,
        rows.map((r) => r.id),
      ))
    const needsSteps = rows.some((r) => (stepCodes.get(r.id) ?? []).length > 0)
    const [steps, price] = await Promise.all([needsSteps ? repo.steps(db, workshopId) : [], pricing.get(workshopId)])
    const graph = graphOf(steps)
    return rows.map((r) => toOperation(r, stepCodes.get(r.id) ?? [], graph, price))
  }

  async function getOperation(workshopId: string, id: string): Promise<LabourOperation> {
    const row = await repo.findOperation(workshopId, id)
    if (!row) throw new NotFoundError('No such labour operation in this workshop.')
    const [op] = await present(workshopId, [row])
    if (!op) throw new NotFoundError('No such labour operation in this workshop.')
    return op
  }

  async function saveOperation(workshopId: string, id: string | null, input: LabourOperationInput): Promise<LabourOperation> {
    const savedId = await db.transaction(async (tx) => {
      const graph = graphOf(await repo.steps(tx, workshopId))
      const issues = operationIssues(input, graph)
      if (issues.length > 0)
        throw new ValidationError('Some of the details are not right. Please check the highlighted fields.', bodyIssues(issues))
      const values = {
        code: input.code,
        name: input.name,
        synonyms: input.synonyms,
        system: input.system,
        vehicleGroups: input.vehicleGroups,
        side: input.side,
        bookHours: input.bookHours,
        category: input.category,
        notes: input.notes ?? null,
      }
      const [row] = await codeTaken(
        () =>
          id
            ? tx
                .update(labourOperations)
                .set(values)
                .where(and(eq(labourOperations.workshopId, workshopId), eq(labourOperations.id, id)))
                .returning({ id: labourOperations.id })
            : tx
                .insert(labourOperations)
                .values({ workshopId, ...values })
                .returning({ id: labourOperations.id }),
        `Another operation already has the code ${input.code}.`,
      )
      if (!row) throw new NotFoundError('No such labour operation in this workshop.')
      await repo.setOperationSteps(tx, workshopId, new Map([[row.id, input.accessSteps]]), (code) => graph.get(code)?.id ?? '')
      return row.id
    })
    return getOperation(workshopId, savedId)
  }

  async function listSteps(workshopId: string): Promise<AccessStep[]> {
    const [steps, usage] = await Promise.all([repo.steps(db, workshopId), repo.stepUsage(workshopId)])
    const graph = graphOf(steps)
    return steps.map((s) => ({
      id: s.row.id,
      code: s.row.code,
      name: s.row.name,
      hours: normalizeDecimal(s.row.hours),
      includes: s.includes,
      totalHours: accessHours([s.row.code], graph),
      usedBy: usage.get(s.row.id) ?? 0,
    }))
  }

  /** Operations that reach any of the steps, with what they book, for the access-time rule. */
  async function operationsReaching(tx: Queryable, workshopId: string, graph: Graph) {
    const rows = await repo.operationsUsingSteps(
      tx,
      workshopId,
      [...graph.values()].map((s) => s.id),
    )
    const stepCodes = await repo.stepCodesOf(tx, workshopId)
    return rows.map(({ row }) => ({ code: row.code, bookHours: normalizeDecimal(row.bookHours), steps: stepCodes.get(row.id) ?? [] }))
  }

  async function saveStep(workshopId: string, id: string | null, input: AccessStepInput): Promise<AccessStep> {
    await db.transaction(async (tx) => {
      const graph = graphOf(await repo.steps(tx, workshopId))
      const current = id ? [...graph.values()].find((s) => s.id === id) : undefined
      if (id && !current) throw new NotFoundError('No such access step in this workshop.')
      // Links are by id, so a new code carries them along: the checks see the graph under the new code.
      const renamed = (code: string) => (current && code === current.code ? input.code : code)
      const operations = (await operationsReaching(tx, workshopId, graph)).map((o) => ({ ...o, steps: o.steps.map(renamed) }))
      if (current && current.code !== input.code) {
        graph.delete(current.code)
        for (const s of graph.values()) s.includes = s.includes.map(renamed)
      }
      const issues = stepGraphIssues(graph, [input], operations)
      if (issues.length > 0)
        throw new ValidationError('Some of the details are not right. Please check the highlighted fields.', bodyIssues(issues))
      const values = { code: input.code, name: input.name, hours: input.hours }
      const [row] = await codeTaken(
        () =>
          id
            ? tx
                .update(accessSteps)
                .set(values)
                .where(and(eq(accessSteps.workshopId, workshopId), eq(accessSteps.id, id)))
                .returning({ id: accessSteps.id })
            : tx
                .insert(accessSteps)
                .values({ workshopId, ...values })
                .returning({ id: accessSteps.id }),
        `Another access step already has the code ${input.code}.`,
      )
      if (!row) throw new NotFoundError('No such access step in this workshop.')
      await repo.setIncludes(tx, workshopId, new Map([[row.id, input.includes]]), (code) => graph.get(code)?.id ?? '')
    })
    const saved = (await listSteps(workshopId)).find((s) => s.code === input.code)
    if (!saved) throw new NotFoundError('No such access step in this workshop.')
    return saved
  }

  // -------------------------------------------------------------------------------------------
  // Imports and exports

  async function planOperations(tx: Queryable, workshopId: string, text: string) {
    const graph = graphOf(await repo.steps(tx, workshopId))
    const stored = await repo.operationsByCode(tx, workshopId)
    const stepCodes = await repo.stepCodesOf(tx, workshopId)
    const existing = new Map([...stored].map(([code, row]) => [code, inputOf(row, stepCodes.get(row.id) ?? [])]))
    const check = (rows: PlannedRow<LabourOperationInput>[]): ImportIssue[] =>
      rows.flatMap((r) =>
        operationIssues(r.input, graph).map((i) => ({
          row: r.row,
          column: operationTable.fieldColumns[i.field] ?? null,
          message: i.message,
        })),
      )
    return { plan: planImport(operationTable, text, existing, check), graph, stored }
  }

  async function planSteps(tx: Queryable, workshopId: string, text: string) {
    const graph = graphOf(await repo.steps(tx, workshopId))
    const existing = new Map([...graph].map(([code, s]) => [code, { code, name: s.name, hours: s.hours, includes: s.includes }]))
    const operations = await operationsReaching(tx, workshopId, graph)
    const check = (rows: PlannedRow<AccessStepInput>[]): ImportIssue[] => {
      const rowOf = new Map(rows.map((r) => [r.input.code, r.row]))
      const changes = rows.filter((r) => r.action !== 'keep').map((r) => r.input)
      return stepGraphIssues(graph, changes, operations).map((i) => ({
        row: rowOf.get(i.code) ?? 1,
        column: stepTable.fieldColumns[i.field] ?? null,
        message: i.message,
      }))
    }
    return planImport(stepTable, text, existing, check)
  }

  async function audit(req: Request, me: StaffPrincipal, table: string, report: ImportReport) {
    await recordAudit(db, auditContextOf(req), {
      action: 'settings.changed',
      workshopId: me.workshop.id,
      subject: { type: table, id: me.workshop.id },
      details: { imported: table, ...report.summary },
    })
  }

  return {
    async search(workshopId: string, q: LabourSearchQuery): Promise<Page<LabourOperation>> {
      const { rows, stepCodes, total } = await repo.search(workshopId, q)
      return { items: await present(workshopId, rows, stepCodes), total, page: q.page, pageSize: q.pageSize }
    },
    get: getOperation,
    /** Live (not archived) operations with these codes, priced; unknown codes are simply absent. */
    async byCodes(workshopId: string, codes: string[]): Promise<LabourOperation[]> {
      if (codes.length === 0) return []
      const rows = await repo.operationsByCodes(workshopId, codes)
      return present(workshopId, rows)
    },
    create: (workshopId: string, input: LabourOperationInput) => saveOperation(workshopId, null, input),
    update: (workshopId: string, id: string, input: LabourOperationInput) => saveOperation(workshopId, id, input),
    async setArchived(workshopId: string, id: string, archived: boolean) {
      const [row] = await db
        .update(labourOperations)
        .set({ archivedAt: archived ? new Date() : null })
        .where(and(eq(labourOperations.workshopId, workshopId), eq(labourOperations.id, id)))
        .returning({ id: labourOperations.id })
      if (!row) throw new NotFoundError('No such labour operation in this workshop.')
      return getOperation(workshopId, id)
    },

    listSteps,
    createStep: (workshopId: string, input: AccessStepInput) => saveStep(workshopId, null, input),
    updateStep: (workshopId: string, id: string, input: AccessStepInput) => saveStep(workshopId, id, input),
    async removeStep(workshopId: string, id: string) {
      const removed = await deleteOrRefuse(
        () =>
          db
            .delete(accessSteps)
            .where(and(eq(accessSteps.workshopId, workshopId), eq(accessSteps.id, id)))
            .returning({ id: accessSteps.id }),
        'Operations or other access steps use this step, so it cannot be deleted. Take it off them first.',
      )
      if (removed.length === 0) throw new NotFoundError('No such access step in this workshop.')
    },

    async recordClockTime(me: StaffPrincipal, operationId: string, input: ClockTimeInput): Promise<ClockTime> {
      const workshopId = me.workshop.id
      if (!(await repo.findOperation(workshopId, operationId))) throw new NotFoundError('No such labour operation in this workshop.')
      if (input.jobId && !(await repo.jobExists(workshopId, input.jobId))) throw new NotFoundError('No such job in this workshop.')
      const row = await repo.insertClockTime({
        workshopId,
        operationId,
        jobId: input.jobId ?? null,
        technicianId: me.id,
        hours: input.hours,
      })
      return {
        id: row.id,
        operationId: row.operationId,
        jobId: row.jobId,
        technicianId: row.technicianId,
        hours: normalizeDecimal(row.hours),
        recordedAt: row.recordedAt.toISOString(),
      }
    },

    async timeComparison(workshopId: string, q: TimeComparisonQuery): Promise<TimeComparisonRow[]> {
      const rows = await repo.timeComparison(workshopId, q)
      return rows.map((r) => ({ ...r, bookHours: normalizeDecimal(r.bookHours), medianHours: normalizeDecimal(r.medianHours) }))
    },

    async checkOperationsImport(workshopId: string, text: string): Promise<ImportReport> {
      const { plan } = await planOperations(db, workshopId, text)
      return reportOf(plan, operationTable, false)
    },

    async importOperations(req: Request, me: StaffPrincipal, text: string): Promise<ImportReport> {
      const workshopId = me.workshop.id
      const report = await db.transaction(async (tx) => {
        await lockImports(tx, workshopId)
        const { plan, graph } = await planOperations(tx, workshopId, text)
        if (plan.errors.length > 0) refuseImport(plan.errors)
        const writes = plan.rows.filter((r) => r.action !== 'keep')
        const ids = new Map<string, string>()
        for (const chunk of chunks(writes, 1000)) {
          const saved = await tx
            .insert(labourOperations)
            .values(
              chunk.map(({ input: i }) => ({
                workshopId,
                code: i.code,
                name: i.name,
                synonyms: i.synonyms,
                system: i.system,
                vehicleGroups: i.vehicleGroups,
                side: i.side,
                bookHours: i.bookHours,
                category: i.category,
                notes: i.notes ?? null,
              })),
            )
            .onConflictDoUpdate({
              target: [labourOperations.workshopId, labourOperations.code],
              set: {
                name: sql`excluded.name`,
                synonyms: sql`excluded.synonyms`,
                system: sql`excluded.system`,
                vehicleGroups: sql`excluded.vehicle_groups`,
                side: sql`excluded.side`,
                bookHours: sql`excluded.book_hours`,
                category: sql`excluded.category`,
                notes: sql`excluded.notes`,
                updatedAt: sql`now()`,
              },
            })
            .returning({ id: labourOperations.id, code: labourOperations.code })
          for (const s of saved) ids.set(s.code, s.id)
        }
        const steps = new Map(writes.map((r) => [ids.get(r.input.code) ?? '', r.input.accessSteps]))
        await repo.setOperationSteps(tx, workshopId, steps, (code) => graph.get(code)?.id ?? '')
        return reportOf(plan, operationTable, true)
      })
      await audit(req, me, 'labour-operations', report)
      return report
    },

    async checkStepsImport(workshopId: string, text: string): Promise<ImportReport> {
      return reportOf(await planSteps(db, workshopId, text), stepTable, false)
    },

    async importSteps(req: Request, me: StaffPrincipal, text: string): Promise<ImportReport> {
      const workshopId = me.workshop.id
      const report = await db.transaction(async (tx) => {
        await lockImports(tx, workshopId)
        const plan = await planSteps(tx, workshopId, text)
        if (plan.errors.length > 0) refuseImport(plan.errors)
        const writes = plan.rows.filter((r) => r.action !== 'keep')
        for (const chunk of chunks(writes, 2000)) {
          await tx
            .insert(accessSteps)
            .values(chunk.map(({ input: i }) => ({ workshopId, code: i.code, name: i.name, hours: i.hours })))
            .onConflictDoUpdate({
              target: [accessSteps.workshopId, accessSteps.code],
              set: { name: sql`excluded.name`, hours: sql`excluded.hours`, updatedAt: sql`now()` },
            })
        }
        // Includes may point at steps added by this same file, so edges go in once every step exists.
        const graph = graphOf(await repo.steps(tx, workshopId))
        const idOf = (code: string) => graph.get(code)?.id ?? ''
        await repo.setIncludes(tx, workshopId, new Map(writes.map((r) => [idOf(r.input.code), r.input.includes])), idOf)
        return reportOf(plan, stepTable, true)
      })
      await audit(req, me, 'access-steps', report)
      return report
    },

    async exportOperations(workshopId: string): Promise<string> {
      const [stored, stepCodes] = await Promise.all([repo.operationsByCode(db, workshopId), repo.stepCodesOf(db, workshopId)])
      const rows = [...stored.values()]
        .filter((r) => r.archivedAt === null)
        .sort((a, b) => a.code.localeCompare(b.code))
        .map((r) => guarded(operationTable, inputOf(r, stepCodes.get(r.id) ?? []), ['name', 'synonyms', 'vehicle_groups', 'notes']))
      return writeCsv(columnNames(operationTable), rows)
    },

    async exportSteps(workshopId: string): Promise<string> {
      const steps = await repo.steps(db, workshopId)
      const rows = steps.map((s) => ({
        code: s.row.code,
        name: guardText(s.row.name),
        hours: normalizeDecimal(s.row.hours),
        includes: joinList(s.includes),
      }))
      return writeCsv(columnNames(stepTable), rows)
    },

    operationsTemplate: () => writeCsv(columnNames(operationTable), [operationTemplateRow]),
    stepsTemplate: () => writeCsv(columnNames(stepTable), [stepTemplateRow]),
  }
}

const columnNames = <I>(table: ImportTable<I>) => table.columns.map((c) => c.name)

function guarded<I>(table: ImportTable<I>, input: I, textColumns: string[]): Record<string, string> {
  const cells = table.cells(input)
  for (const c of textColumns) cells[c] = guardText(cells[c] ?? '')
  return cells
}

export type LabourService = ReturnType<typeof createLabourService>
