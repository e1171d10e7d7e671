/**
 * UK VAT rounding, checked against HMRC's rules as we understand them.
 *
 * Source: HMRC VAT Notice 700 ("The VAT guide"), section 17.5 on rounding amounts of VAT on
 * invoices. The page cannot be fetched here, so its wording is from memory: VAT may be worked
 * out per line and rounded to the nearest penny, or, for the invoice as a whole, the total VAT
 * may be rounded down to a whole penny (any fraction of a penny ignored).
 *
 * The VAT fraction for the 20% standard rate (in force since 4 January 2011) is 20/120 = 1/6,
 * also from memory of HMRC guidance; for the 5% reduced rate it is 5/105 = 1/21.
 *
 * Amounts are invented; every expected figure is worked by hand in the comment beside it.
 */
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { calculateEstimate } from '../../shared/estimate'
import type { EstimateInput } from '../../shared/estimate/contract'
import { estimate, fee, item, labour } from './estimate-helpers'

type Rounding = EstimateInput['taxRounding']

const scope = (taxMode: EstimateInput['taxMode'], taxRounding: Rounding, lines: EstimateInput['items'][number]['lines']) =>
  calculateEstimate(estimate({ taxMode, taxRounding, items: [item('a', 'approved', lines)] })).approved

describe('prices without VAT (exclusive)', () => {
  // Three lines of £10.03 at 20%: VAT 200.6p each.
  // Per line, nearest penny: 201p × 3 = 603p. Per invoice: 3009p × 20% = 601.8p → 602p half-up, 601p rounded down.
  it.each([
    { rounding: 'per-line', tax: 603 },
    { rounding: 'per-invoice', tax: 602 },
    { rounding: 'per-invoice-down', tax: 601 },
  ] as const)('£10.03 × 3 at 20%, $rounding → $tax p VAT', ({ rounding, tax }) => {
    const result = scope('exclusive', rounding, [fee(1003), fee(1003), fee(1003)])
    expect(result).toMatchObject({ net: 3009, tax, gross: 3009 + tax })
    expect(result.taxByRate).toEqual([{ rate: '20', net: 3009, tax, gross: 3009 + tax }])
  })

  it.each([
    // At 20% VAT on whole pennies is never exactly half a penny, so use 5%: £2.10 × 5% = 10.5p.
    // Nearest penny with halves up: 11p; rounded down: 10p.
    { rounding: 'per-line', tax: 11 },
    { rounding: 'per-invoice', tax: 11 },
    { rounding: 'per-invoice-down', tax: 10 },
  ] as const)('half a penny of VAT, $rounding → $tax p', ({ rounding, tax }) => {
    expect(scope('exclusive', rounding, [fee(210, '5')])).toMatchObject({ net: 210, tax, gross: 210 + tax })
  })

  it('groups tax by rate and rounds each rate on its own', () => {
    // 20%: 1003p + 1003p = 2006p → 401.2p; 5%: 999p → 49.95p; 0%: 500p → 0.
    // Per invoice (half-up): 401 + 50 = 451. Rounded down: 401 + 49 = 450. Per line: 201 + 201 + 50 = 452.
    const lines = [fee(1003, '20'), fee(999, '5'), fee(1003, '20'), fee(500, '0')]
    expect(scope('exclusive', 'per-invoice', lines).taxByRate).toEqual([
      { rate: '0', net: 500, tax: 0, gross: 500 },
      { rate: '5', net: 999, tax: 50, gross: 1049 },
      { rate: '20', net: 2006, tax: 401, gross: 2407 },
    ])
    expect(scope('exclusive', 'per-invoice-down', lines).tax).toBe(450)
    expect(scope('exclusive', 'per-line', lines).tax).toBe(452)
  })
})

describe('prices including VAT (inclusive)', () => {
  it.each([
    // £100.00 including 20%: VAT = 10000 / 6 = 1666.67p → 1667p to the nearest penny, 1666p rounded down.
    { lines: [fee(10000)], rounding: 'per-line', tax: 1667 },
    { lines: [fee(10000)], rounding: 'per-invoice', tax: 1667 },
    { lines: [fee(10000)], rounding: 'per-invoice-down', tax: 1666 },
    // Three lines of £10.05 including 20%: 1005 / 6 = 167.5p each → 168p per line, 504p;
    // invoice 3015 / 6 = 502.5p → 503p half-up, 502p rounded down.
    { lines: [fee(1005), fee(1005), fee(1005)], rounding: 'per-line', tax: 504 },
    { lines: [fee(1005), fee(1005), fee(1005)], rounding: 'per-invoice', tax: 503 },
    { lines: [fee(1005), fee(1005), fee(1005)], rounding: 'per-invoice-down', tax: 502 },
    // 5% reduced rate, fraction 1/21: £10.50 → 50p exactly; £10.00 → 47.619p → 48p or 47p.
    { lines: [fee(1050, '5')], rounding: 'per-line', tax: 50 },
    { lines: [fee(1000, '5')], rounding: 'per-invoice', tax: 48 },
    { lines: [fee(1000, '5')], rounding: 'per-invoice-down', tax: 47 },
  ] as const)('$lines.length line(s), $rounding → $tax p VAT', ({ lines, rounding, tax }) => {
    const gross = lines.reduce((sum, l) => sum + (l.kind === 'fee' ? l.amount : 0), 0)
    expect(scope('inclusive', rounding, [...lines])).toMatchObject({ gross, tax, net: gross - tax })
  })

  it('uses the VAT fraction 1/6 for the 20% rate on any gross amount', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 10_000_000 }), (gross) => {
        const result = scope('inclusive', 'per-invoice', [fee(gross)])
        // Nearest penny of gross / 6, halves up: (2 × gross + 6) div 12.
        expect(result.tax).toBe(Math.floor((2 * gross + 6) / 12))
        expect(scope('inclusive', 'per-invoice-down', [fee(gross)]).tax).toBe(Math.floor(gross / 6))
      }),
      { numRuns: 200 },
    )
  })

  it('prices shared labour with VAT inside the rate', () => {
    // £102 an hour including VAT; 2.6 h book, 1.5 h already done: 1.1 h × 10200 = 11220p,
    // of which 11220 / 6 = 1870p is VAT.
    const result = calculateEstimate(
      estimate({
        taxMode: 'inclusive',
        accessSteps: [{ code: 'hub', hours: '1.5', includes: [] }],
        items: [item('a', 'approved', [labour('3.2', 10200, '20', ['hub'])]), item('b', 'approved', [labour('2.6', 10200, '20', ['hub'])])],
      }),
    )
    expect(result.items[1]).toMatchObject({ gross: 11220, tax: 1870, net: 9350 })
  })
})
