import { NotFoundError } from '../../lib/errors'
import { accessHours } from '../../../shared/catalogue/access-graph'
import { normalizeDecimal } from '../../../shared/decimal'
import { labourPrice } from '../../../shared/catalogue/pricing'
import type { AccessStep, LabourOperation, LabourSearchQuery, Pricing } from '../../../shared/schemas/catalogue'
import type { Page } from '../../../shared/schemas/common'
import type { LabourRepo, OperationRecord } from './labour.repo'
import { type Graph, graphOf, inputOf } from './labour.rules'
import type { PricingRepo } from './pricing.repo'

export const noSuchOperation = () => new NotFoundError('No such labour operation in this workshop.')

function toOperation(row: OperationRecord, stepCodes: string[], graph: Graph, price: Pricing): LabourOperation {
  const rateMinor = price.rates[row.category]
  const bookHours = normalizeDecimal(row.bookHours)
  return {
    ...inputOf(row, stepCodes),
    id: row.id,
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

/**
 * The labour table as advisors and estimates read it: operations priced with the workshop's rates
 * and shown with their access steps, and the steps with their total time and use.
 */
export function createLabourService(deps: { repo: LabourRepo; pricing: PricingRepo }) {
  const { repo, pricing } = deps
  const db = repo.db

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

  return {
    async search(workshopId: string, q: LabourSearchQuery): Promise<Page<LabourOperation>> {
      const { rows, stepCodes, total } = await repo.search(workshopId, q)
      return { items: await present(workshopId, rows, stepCodes), total, page: q.page, pageSize: q.pageSize }
    },

    async get(workshopId: string, id: string): Promise<LabourOperation> {
      const row = await repo.findOperation(workshopId, id)
      const [op] = row ? await present(workshopId, [row]) : []
      if (!op) throw noSuchOperation()
      return op
    },

    /** Live (not archived) operations with these codes, priced; unknown codes are simply absent. */
    async byCodes(workshopId: string, codes: string[]): Promise<LabourOperation[]> {
      if (codes.length === 0) return []
      const rows = await repo.operationsByCodes(workshopId, codes)
      return present(workshopId, rows)
    },

    async listSteps(workshopId: string): Promise<AccessStep[]> {
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
    },
  }
}

export type LabourService = ReturnType<typeof createLabourService>
