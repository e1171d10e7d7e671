import type { Queryable } from '../../db/client'
import { type AuditContext, recordAudit } from '../../lib/audit'
import { saveOrRefuseTaken } from '../../lib/db-errors'
import { NotFoundError } from '../../lib/errors'
import { normalizeDecimal } from '../../../shared/decimal'
import { sellPrice } from '../../../shared/catalogue/pricing'
import { minorUnitExponent } from '../../../shared/money'
import type { StaffPrincipal } from '../../../shared/schemas/auth'
import type { ImportReport, Part, PartInput, PartSearchQuery, Pricing } from '../../../shared/schemas/catalogue'
import type { Page } from '../../../shared/schemas/common'
import { guardText, writeCsv } from './catalogue.csv'
import { planImport, refuseImport, reportOf } from './catalogue.import'
import { partTable, partTemplateRow } from './parts.import'
import type { PartRecord, PartsRepo, PartValues } from './parts.repo'
import type { PricingRepo } from './pricing.repo'

const toPart = (row: PartRecord, price: Pricing): Part => {
  const sell = sellPrice(row, price.markupBands, price.currency)
  return {
    id: row.id,
    partNumber: row.partNumber,
    description: row.description,
    supplierRef: row.supplierRef,
    costMinor: row.costMinor,
    fixedPriceMinor: row.sellPriceMinor,
    sellPriceMinor: sell?.amountMinor ?? null,
    priceSource: sell?.source ?? null,
    markupPercent: sell?.source === 'markup' ? sell.markupPercent : null,
    taxRate: normalizeDecimal(row.taxRate),
    stockQuantity: row.stockQuantity,
    currency: price.currency,
    archived: row.archivedAt !== null,
  }
}

const inputOf = (row: PartRecord): PartInput => ({
  partNumber: row.partNumber,
  description: row.description,
  supplierRef: row.supplierRef,
  costMinor: row.costMinor,
  sellPriceMinor: row.sellPriceMinor,
  taxRate: normalizeDecimal(row.taxRate),
  stockQuantity: row.stockQuantity,
})

const valuesOf = (input: PartInput, defaultTaxRate: string): PartValues => ({
  partNumber: input.partNumber,
  description: input.description,
  supplierRef: input.supplierRef ?? null,
  costMinor: input.costMinor,
  sellPriceMinor: input.sellPriceMinor,
  taxRate: input.taxRate ?? defaultTaxRate,
  stockQuantity: input.stockQuantity,
})

export function createPartsService(deps: { repo: PartsRepo; pricing: PricingRepo }) {
  const { repo, pricing } = deps
  const db = repo.db

  async function get(workshopId: string, id: string): Promise<Part> {
    const [row, price] = await Promise.all([repo.find(workshopId, id), pricing.get(workshopId)])
    if (!row) throw new NotFoundError('No such part in this workshop.')
    return toPart(row, price)
  }

  async function plan(tx: Queryable, workshopId: string, text: string) {
    const stored = await repo.byPartNumber(tx, workshopId)
    const price = await pricing.get(workshopId)
    const table = partTable(minorUnitExponent(price.currency), price.defaultTaxRate)
    const existing = new Map([...stored].map(([key, row]) => [key, inputOf(row)]))
    return { plan: planImport(table, text, existing), table, price }
  }

  const taken = (partNumber: string) => `Another part already has the number ${partNumber}.`

  return {
    async search(workshopId: string, q: PartSearchQuery): Promise<Page<Part>> {
      const [{ rows, total }, price] = await Promise.all([repo.search(workshopId, q), pricing.get(workshopId)])
      return { items: rows.map((r) => toPart(r, price)), total, page: q.page, pageSize: q.pageSize }
    },
    get,
    async create(workshopId: string, input: PartInput): Promise<Part> {
      const price = await pricing.get(workshopId)
      const row = await saveOrRefuseTaken(() => repo.insert(workshopId, valuesOf(input, price.defaultTaxRate)), taken(input.partNumber))
      return toPart(row, price)
    },
    async update(workshopId: string, id: string, input: PartInput): Promise<Part> {
      const price = await pricing.get(workshopId)
      const row = await saveOrRefuseTaken(() => repo.update(workshopId, id, valuesOf(input, price.defaultTaxRate)), taken(input.partNumber))
      if (!row) throw new NotFoundError('No such part in this workshop.')
      return toPart(row, price)
    },
    async setArchived(workshopId: string, id: string, archived: boolean): Promise<Part> {
      const row = await repo.update(workshopId, id, { archivedAt: archived ? new Date() : null })
      if (!row) throw new NotFoundError('No such part in this workshop.')
      return get(workshopId, id)
    },

    async checkImport(workshopId: string, text: string): Promise<ImportReport> {
      const { plan: p, table } = await plan(db, workshopId, text)
      return reportOf(p, table, false)
    },

    async import(ctx: AuditContext, me: StaffPrincipal, text: string): Promise<ImportReport> {
      const workshopId = me.workshop.id
      const report = await repo.transaction(async (tx) => {
        await repo.lockImports(tx, workshopId)
        const { plan: p, table, price } = await plan(tx, workshopId, text)
        if (p.errors.length > 0) refuseImport(p.errors)
        const writes = p.rows.filter((r) => r.action !== 'keep').map((r) => valuesOf(r.input, price.defaultTaxRate))
        await repo.upsert(tx, workshopId, writes)
        return reportOf(p, table, true)
      })
      await recordAudit(db, ctx, {
        action: 'settings.changed',
        workshopId,
        subject: { type: 'parts', id: workshopId },
        details: { imported: 'parts', ...report.summary },
      })
      return report
    },

    async export(workshopId: string): Promise<string> {
      const [stored, price] = await Promise.all([repo.byPartNumber(db, workshopId), pricing.get(workshopId)])
      const table = partTable(minorUnitExponent(price.currency), price.defaultTaxRate)
      const rows = [...stored.values()]
        .filter((r) => r.archivedAt === null)
        .sort((a, b) => a.partNumber.localeCompare(b.partNumber))
        .map((r) => {
          const cells = table.cells(inputOf(r))
          return {
            ...cells,
            part_number: guardText(cells.part_number ?? ''),
            description: guardText(cells.description ?? ''),
            supplier_ref: guardText(cells.supplier_ref ?? ''),
          }
        })
      return writeCsv(
        table.columns.map((c) => c.name),
        rows,
      )
    },

    async template(workshopId: string): Promise<string> {
      const price = await pricing.get(workshopId)
      const table = partTable(minorUnitExponent(price.currency), price.defaultTaxRate)
      return writeCsv(
        table.columns.map((c) => c.name),
        [partTemplateRow(minorUnitExponent(price.currency))],
      )
    },
  }
}

export type PartsService = ReturnType<typeof createPartsService>
