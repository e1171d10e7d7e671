import { eq, sql } from 'drizzle-orm'
import type { Database } from '../../db/client'
import { markupBands, workshopPricing, workshops } from '../../db/schema'
import type { Pricing, PricingInput } from '../../../shared/schemas/catalogue'
import { normalizeDecimal } from '../../../shared/decimal'

/** UK VAT standard rate (HMRC), the default until the owner saves pricing; DESIGN §5. */
export const DEFAULT_TAX_RATE = '20'

export function createPricingRepo(db: Database) {
  return {
    /** The workshop's pricing, with rates unset and no bands until the owner saves it. */
    async get(workshopId: string): Promise<Pricing> {
      // One round trip: every lookup result is priced with it.
      const [found] = await db
        .select({
          currency: workshops.currency,
          pricing: workshopPricing,
          bands: sql<{ fromCostMinor: number; markupPercent: string }[]>`coalesce((
            select json_agg(json_build_object('fromCostMinor', b.from_cost_minor, 'markupPercent', b.markup_percent::text) order by b.from_cost_minor)
            from ${markupBands} b where b.workshop_id = ${workshopId}), '[]')`,
        })
        .from(workshops)
        .leftJoin(workshopPricing, eq(workshopPricing.workshopId, workshops.id))
        .where(eq(workshops.id, workshopId))
      const row = found?.pricing
      return {
        currency: found?.currency ?? 'GBP',
        rates: {
          standard: row?.standardRateMinor ?? null,
          diagnostic: row?.diagnosticRateMinor ?? null,
          specialist: row?.specialistRateMinor ?? null,
        },
        defaultTaxRate: row ? normalizeDecimal(row.defaultTaxRate) : DEFAULT_TAX_RATE,
        markupBands: (found?.bands ?? []).map((b) => ({
          fromCostMinor: b.fromCostMinor,
          markupPercent: normalizeDecimal(b.markupPercent),
        })),
      }
    },

    async save(workshopId: string, input: PricingInput): Promise<void> {
      await db.transaction(async (tx) => {
        const values = {
          standardRateMinor: input.rates.standard,
          diagnosticRateMinor: input.rates.diagnostic,
          specialistRateMinor: input.rates.specialist,
          defaultTaxRate: input.defaultTaxRate,
        }
        await tx
          .insert(workshopPricing)
          .values({ workshopId, ...values })
          .onConflictDoUpdate({ target: workshopPricing.workshopId, set: values })
        await tx.delete(markupBands).where(eq(markupBands.workshopId, workshopId))
        if (input.markupBands.length > 0) await tx.insert(markupBands).values(input.markupBands.map((b) => ({ workshopId, ...b })))
      })
    },
  }
}

export type PricingRepo = ReturnType<typeof createPricingRepo>
