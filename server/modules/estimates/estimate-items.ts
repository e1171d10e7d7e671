import { randomUUID } from 'node:crypto'
import type { LabourService } from '../catalogue/labour.service'
import type { PricingRepo } from '../catalogue/pricing.repo'
import type { EstimatesRepo, FindingRecord, Queryable } from './estimates.repo'
import type { DraftItem, DraftLine, EstimateDraft } from '../../../shared/schemas/estimates'
import { positionLabels } from '../../../shared/schemas/inspections'
import { sellPrice } from '../../../shared/catalogue/pricing'
import { normalizeDecimal } from '../../../shared/decimal'

/** Letters that sided operation codes end in, by the finding's position (common practice in our demo table: -L/-R, -F/-R). */
const sideSuffix: Record<string, string | null> = { left: 'L', right: 'R', front: 'F', rear: 'R', none: null }

export interface ItemsFromFindings {
  items: DraftItem[]
  accessSteps: EstimateDraft['accessSteps']
  /** What the advisor should check by hand: labour or parts not found, prices missing, guesses made. */
  notices: string[]
}

export interface EstimateItemsDeps {
  repo: Pick<EstimatesRepo, 'partsForCodes'>
  labour: Pick<LabourService, 'byCodes' | 'listSteps'>
  pricing: Pick<PricingRepo, 'get'>
}

/** Turns a job's findings into estimate items priced from the workshop's labour-time table and parts list. */
export function createEstimateItems(deps: EstimateItemsDeps) {
  const { repo, labour, pricing } = deps
  return {
    /** Items for `rows` in their order; the access steps they need join those the draft already has. */
    async fromFindings(q: Queryable, workshopId: string, draft: EstimateDraft, rows: FindingRecord[]): Promise<ItemsFromFindings> {
      const price = await pricing.get(workshopId)
      const notices: string[] = []
      const wanted = new Set<string>()
      for (const f of rows) {
        const suffix = sideSuffix[f.position]
        for (const code of f.suggestedRepair.labour) {
          wanted.add(code)
          if (suffix) wanted.add(`${code}-${suffix}`)
        }
      }
      const operations = new Map((await labour.byCodes(workshopId, [...wanted])).map((o) => [o.code, o]))
      const partCodes = [...new Set(rows.flatMap((f) => f.suggestedRepair.parts))]
      const partRows = await repo.partsForCodes(q, workshopId, partCodes)
      const allSteps = operations.size > 0 ? await labour.listSteps(workshopId) : []
      const stepByCode = new Map(allSteps.map((s) => [s.code, s]))
      const accessSteps = [...draft.accessSteps]
      const known = new Set(accessSteps.map((s) => s.code))
      const addStep = (code: string) => {
        if (known.has(code)) return
        const s = stepByCode.get(code)
        if (!s) return
        known.add(code)
        accessSteps.push({ code: s.code, hours: s.hours, includes: s.includes, label: s.name })
        for (const inner of s.includes) addStep(inner)
      }

      const items = rows.map((f): DraftItem => {
        const suffix = sideSuffix[f.position]
        const lines: DraftLine[] = []
        for (const code of f.suggestedRepair.labour) {
          const op = operations.get(code) ?? (suffix ? operations.get(`${code}-${suffix}`) : undefined)
          if (!op) {
            notices.push(`"${f.title}": the suggested labour ${code} is not in your labour-time table; add the labour by hand.`)
            continue
          }
          if (op.rateMinor === null)
            notices.push(
              `"${f.title}": no hourly rate is set for ${op.category} labour, so ${op.code} is priced at 0 until the owner sets it.`,
            )
          for (const s of op.accessSteps) addStep(s.code)
          lines.push({
            id: randomUUID(),
            kind: 'labour',
            description: op.name,
            hours: op.bookHours,
            rate: op.rateMinor ?? 0,
            taxRate: price.defaultTaxRate,
            accessSteps: op.accessSteps.map((s) => s.code),
            operationCode: op.code,
            category: op.category,
          })
        }
        for (const code of f.suggestedRepair.parts) {
          const exact = partRows.find((p) => p.partNumber === code)
          const variants = partRows.filter((p) => p.partNumber.startsWith(`${code}-`))
          const part = exact ?? variants[0]
          if (!part) {
            notices.push(`"${f.title}": the suggested part ${code} is not in your parts list; add the part by hand.`)
            continue
          }
          // Parts carry no vehicle group, so when several variants match the first is only a guess.
          if (!exact && variants.length > 1) {
            notices.push(
              `"${f.title}": ${variants.length} parts match ${code} (${variants.map((v) => v.partNumber).join(', ')}); ${part.partNumber} was added — check it is the right one for this vehicle.`,
            )
          }
          const sell = sellPrice(part, price.markupBands, price.currency)
          if (!sell) notices.push(`"${f.title}": ${part.partNumber} has no price (no markup band covers its cost), so it is priced at 0.`)
          lines.push({
            id: randomUUID(),
            kind: 'part',
            description: part.description,
            quantity: '1',
            unitPrice: sell?.amountMinor ?? 0,
            taxRate: normalizeDecimal(part.taxRate),
            partNumber: part.partNumber,
          })
        }
        const side = positionLabels[f.position]
        return {
          id: randomUUID(),
          findingId: f.id,
          // "Swivel seal leaking — left", unless the finding's own words already say which side.
          title: side && !f.title.toLowerCase().includes(side.toLowerCase()) ? `${f.title} — ${side.toLowerCase()}` : f.title,
          severity: f.severity,
          customerNote: '',
          requires: [],
          lines,
        }
      })
      return { items, accessSteps, notices }
    },
  }
}

export type EstimateItems = ReturnType<typeof createEstimateItems>
