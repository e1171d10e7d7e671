/**
 * Display prices for the catalogue: labour at the workshop's hourly rate and a part's sell price
 * from its cost and the markup bands. Both are rounded once, half up to the currency's minor
 * unit, with dinero.js. Estimate totals are the estimate engine's job (shared/estimate).
 */
import { dinero, halfUp, multiply, toSnapshot, transformScale } from 'dinero.js/bigint'
import { currencyFor } from '../money'
import { toHundredths } from '../decimal'

export interface MarkupBand {
  /** Minor units; the band applies to costs from here up to, not including, the next band's start. */
  fromCostMinor: number
  /** Decimal string, e.g. "35" or "32.5". */
  markupPercent: string
}

/** rate × hours, half up to the minor unit; null when the workshop has not set the rate. */
export function labourPrice(rateMinor: number | null, hours: string, currency: string): number | null {
  if (rateMinor === null) return null
  return multiplyHalfUp(rateMinor, BigInt(toHundredths(hours)), 2n, currency)
}

/**
 * The band a cost falls in: the one with the highest start at or below the cost, so a cost
 * exactly on a boundary takes the band that starts there. Null when no band starts low enough.
 */
export function bandFor(costMinor: number, bands: readonly MarkupBand[]): MarkupBand | null {
  let found: MarkupBand | null = null
  for (const band of bands) {
    if (band.fromCostMinor <= costMinor && (found === null || band.fromCostMinor > found.fromCostMinor)) found = band
  }
  return found
}

/** cost × (100 + markup) / 100, half up to the minor unit. */
export function markedUpPrice(costMinor: number, markupPercent: string, currency: string): number {
  // Percent in hundredths over 100 × 100: a factor with four decimal places, exact for "32.25".
  return multiplyHalfUp(costMinor, 10_000n + BigInt(toHundredths(markupPercent)), 4n, currency)
}

export type SellPrice = { amountMinor: number; source: 'fixed' } | { amountMinor: number; source: 'markup'; markupPercent: string }

/** A part's sell price: its fixed price if it has one, else its cost marked up by its band; null if no band covers the cost. */
export function sellPrice(
  part: { costMinor: number; sellPriceMinor: number | null },
  bands: readonly MarkupBand[],
  currency: string,
): SellPrice | null {
  if (part.sellPriceMinor !== null) return { amountMinor: part.sellPriceMinor, source: 'fixed' }
  const band = bandFor(part.costMinor, bands)
  if (!band) return null
  return { amountMinor: markedUpPrice(part.costMinor, band.markupPercent, currency), source: 'markup', markupPercent: band.markupPercent }
}

function multiplyHalfUp(amountMinor: number, factor: bigint, factorScale: bigint, code: string): number {
  if (!Number.isSafeInteger(amountMinor) || amountMinor < 0)
    throw new RangeError(`Not a non-negative whole number of minor units: ${amountMinor}`)
  const currency = currencyFor(code)
  const product = multiply(dinero({ amount: BigInt(amountMinor), currency }), { amount: factor, scale: factorScale })
  const rounded = toSnapshot(transformScale(product, currency.exponent, halfUp))
  return Number(rounded.amount)
}
