import { type AuditContext, recordAudit } from '../../lib/audit'
import { normalizeDecimal } from '../../../shared/decimal'
import type { StaffPrincipal } from '../../../shared/schemas/auth'
import type { AccessStepInput, ImportIssue, ImportReport, LabourOperationInput } from '../../../shared/schemas/catalogue'
import type { Queryable } from '../../db/client'
import { guardText, joinList, writeCsv } from './catalogue.csv'
import { type ImportTable, type PlannedRow, planImport, refuseImport, reportOf } from './catalogue.import'
import { operationTable, operationTemplateRow, stepTable, stepTemplateRow } from './labour.import'
import type { LabourRepo } from './labour.repo'
import { graphOf, inputOf, operationIssues, stepGraphIssues, valuesOf } from './labour.rules'

const columnNames = <I>(table: ImportTable<I>) => table.columns.map((c) => c.name)

function guarded<I>(table: ImportTable<I>, input: I, textColumns: string[]): Record<string, string> {
  const cells = table.cells(input)
  for (const c of textColumns) cells[c] = guardText(cells[c] ?? '')
  return cells
}

/**
 * The labour table as CSV: templates, exports, and imports that are checked in full (a dry run
 * says what would change) and then written in one transaction, or not at all.
 */
export function createLabourFilesService(deps: { repo: LabourRepo }) {
  const { repo } = deps
  const db = repo.db

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
    return { plan: planImport(operationTable, text, existing, check), graph }
  }

  async function planSteps(tx: Queryable, workshopId: string, text: string) {
    const graph = graphOf(await repo.steps(tx, workshopId))
    const existing = new Map([...graph].map(([code, s]) => [code, { code, name: s.name, hours: s.hours, includes: s.includes }]))
    const operations = await repo.bookedOperationsUsing(
      tx,
      workshopId,
      [...graph.values()].map((s) => s.id),
    )
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

  async function audit(ctx: AuditContext, me: StaffPrincipal, table: string, report: ImportReport) {
    await recordAudit(db, ctx, {
      action: 'settings.changed',
      workshopId: me.workshop.id,
      subject: { type: table, id: me.workshop.id },
      details: { imported: table, ...report.summary },
    })
  }

  return {
    async checkOperationsImport(workshopId: string, text: string): Promise<ImportReport> {
      const { plan } = await planOperations(db, workshopId, text)
      return reportOf(plan, operationTable, false)
    },

    async importOperations(ctx: AuditContext, me: StaffPrincipal, text: string): Promise<ImportReport> {
      const workshopId = me.workshop.id
      const report = await repo.transaction(async (tx) => {
        await repo.lockImports(tx, workshopId)
        const { plan, graph } = await planOperations(tx, workshopId, text)
        if (plan.errors.length > 0) refuseImport(plan.errors)
        const writes = plan.rows.filter((r) => r.action !== 'keep')
        const ids = await repo.upsertOperations(
          tx,
          workshopId,
          writes.map((r) => valuesOf(r.input)),
        )
        const steps = new Map(writes.map((r) => [ids.get(r.input.code) ?? '', r.input.accessSteps]))
        await repo.setOperationSteps(tx, workshopId, steps, (code) => graph.get(code)?.id ?? '')
        return reportOf(plan, operationTable, true)
      })
      await audit(ctx, me, 'labour-operations', report)
      return report
    },

    async checkStepsImport(workshopId: string, text: string): Promise<ImportReport> {
      return reportOf(await planSteps(db, workshopId, text), stepTable, false)
    },

    async importSteps(ctx: AuditContext, me: StaffPrincipal, text: string): Promise<ImportReport> {
      const workshopId = me.workshop.id
      const report = await repo.transaction(async (tx) => {
        await repo.lockImports(tx, workshopId)
        const plan = await planSteps(tx, workshopId, text)
        if (plan.errors.length > 0) refuseImport(plan.errors)
        const writes = plan.rows.filter((r) => r.action !== 'keep')
        await repo.upsertSteps(
          tx,
          workshopId,
          writes.map(({ input: i }) => ({ code: i.code, name: i.name, hours: i.hours })),
        )
        // Includes may point at steps added by this same file, so edges go in once every step exists.
        const graph = graphOf(await repo.steps(tx, workshopId))
        const idOf = (code: string) => graph.get(code)?.id ?? ''
        await repo.setIncludes(tx, workshopId, new Map(writes.map((r) => [idOf(r.input.code), r.input.includes])), idOf)
        return reportOf(plan, stepTable, true)
      })
      await audit(ctx, me, 'access-steps', report)
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

export type LabourFilesService = ReturnType<typeof createLabourFilesService>
