/**
 * The catalogue's display prices and its hour arithmetic. Rates, costs and bands are made-up
 * inputs; each expected figure is the product worked out by hand and rounded half up to the
 * minor unit, the common practice for a price (and HMRC's "nearest penny" for VAT).
 * Minor units per currency follow ISO 4217 (GBP 2, JPY 0, KWD 3).
 */
import { describe, expect, it } from 'vitest'
import { accessHours, findLoop, type StepNode } from '../../shared/catalogue/access-graph'
import { bandFor, labourPrice, markedUpPrice, type MarkupBand, sellPrice } from '../../shared/catalogue/pricing'

describe('labourPrice: rate × book hours', () => {
  it.each([
    { rate: 8000, hours: '1', currency: 'GBP', expected: 8000 },
    { rate: 8000, hours: '1.5', currency: 'GBP', expected: 12000 },
    { rate: 8500, hours: '0.1', currency: 'GBP', expected: 850 },
    // 7333 × 0.25 = 1833.25 → 1833
    { rate: 7333, hours: '0.25', currency: 'GBP', expected: 1833 },
    // 7333 × 0.5 = 3666.5 → 3667: a half goes up
    { rate: 7333, hours: '0.5', currency: 'GBP', expected: 3667 },
    // 9999 × 2.75 = 27497.25 → 27497
    { rate: 9999, hours: '2.75', currency: 'GBP', expected: 27497 },
    // 8001 × 0.05 = 400.05 → 400
    { rate: 8001, hours: '0.05', currency: 'GBP', expected: 400 },
    // JPY has no minor unit: 9001 × 0.5 = 4500.5 → 4501 yen
    { rate: 9001, hours: '0.5', currency: 'JPY', expected: 4501 },
    // KWD has three: 25005 × 0.1 = 2500.5 → 2501 fils
    { rate: 25005, hours: '0.1', currency: 'KWD', expected: 2501 },
  ])('$rate × $hours h in $currency = $expected', ({ rate, hours, currency, expected }) => {
    expect(labourPrice(rate, hours, currency)).toBe(expected)
  })

  it('has no price while the rate is not set', () => {
    expect(labourPrice(null, '2', 'GBP')).toBeNull()
  })

  it('refuses hours that are not a two-place decimal', () => {
    expect(() => labourPrice(8000, '1.234', 'GBP')).toThrow(RangeError)
    expect(() => labourPrice(8000, '-1', 'GBP')).toThrow(RangeError)
  })
})

describe('markup bands', () => {
  const bands: MarkupBand[] = [
    { fromCostMinor: 0, markupPercent: '60' },
    { fromCostMinor: 2000, markupPercent: '45' },
    { fromCostMinor: 10000, markupPercent: '30' },
  ]

  it.each([
    { cost: 0, band: '60' },
    { cost: 1999, band: '60' },
    { cost: 2000, band: '45' },
    { cost: 2001, band: '45' },
    { cost: 9999, band: '45' },
    { cost: 10000, band: '30' },
    { cost: 1_000_000, band: '30' },
  ])('a cost of $cost falls in the $band % band', ({ cost, band }) => {
    expect(bandFor(cost, bands)?.markupPercent).toBe(band)
  })

  it('finds the band whatever order the bands are given in', () => {
    expect(bandFor(2000, [...bands].reverse())?.markupPercent).toBe('45')
  })

  it('has no band below the lowest start', () => {
    expect(bandFor(50, [{ fromCostMinor: 100, markupPercent: '10' }])).toBeNull()
    expect(bandFor(50, [])).toBeNull()
  })

  it.each([
    // 1999 × 1.6 = 3198.4 → 3198
    { cost: 1999, percent: '60', expected: 3198 },
    // 2000 × 1.45 = 2900
    { cost: 2000, percent: '45', expected: 2900 },
    // 1001 × 1.325 = 1326.325 → 1326
    { cost: 1001, percent: '32.5', expected: 1326 },
    // 1000 × 1.3225 = 1322.5 → 1323: a half goes up
    { cost: 1000, percent: '32.25', expected: 1323 },
    { cost: 1234, percent: '0', expected: 1234 },
    // 333 × 2.5 = 832.5 → 833
    { cost: 333, percent: '150', expected: 833 },
  ])('$cost marked up $percent % = $expected', ({ cost, percent, expected }) => {
    expect(markedUpPrice(cost, percent, 'GBP')).toBe(expected)
  })

  it('uses a fixed sell price before any band', () => {
    expect(sellPrice({ costMinor: 2000, sellPriceMinor: 1 }, bands, 'GBP')).toEqual({ amountMinor: 1, source: 'fixed' })
  })

  it('marks the cost up by its band otherwise, saying which', () => {
    // 10000 × 1.3
    expect(sellPrice({ costMinor: 10000, sellPriceMinor: null }, bands, 'GBP')).toEqual({
      amountMinor: 13000,
      source: 'markup',
      markupPercent: '30',
    })
  })

  it('has no price when no band covers the cost', () => {
    expect(sellPrice({ costMinor: 10, sellPriceMinor: null }, [], 'GBP')).toBeNull()
  })
})

describe('access-step graph', () => {
  const graph = (steps: StepNode[]) => new Map(steps.map((s) => [s.code, s]))

  it('names a loop from its first step back to it', () => {
    expect(
      findLoop([
        { code: 'A', hours: '1', includes: ['B'] },
        { code: 'B', hours: '1', includes: ['C'] },
        { code: 'C', hours: '1', includes: ['A'] },
      ]),
    ).toEqual(['A', 'B', 'C', 'A'])
  })

  it('finds no loop where paths only meet', () => {
    expect(
      findLoop([
        { code: 'TOP', hours: '1', includes: ['L', 'R'] },
        { code: 'L', hours: '1', includes: ['BASE'] },
        { code: 'R', hours: '1', includes: ['BASE'] },
        { code: 'BASE', hours: '1', includes: [] },
      ]),
    ).toBeNull()
  })

  it('adds each step once, however many paths reach it', () => {
    const steps = graph([
      { code: 'TOP', hours: '1', includes: ['L', 'R'] },
      { code: 'L', hours: '0.25', includes: ['BASE'] },
      { code: 'R', hours: '0.25', includes: ['BASE'] },
      { code: 'BASE', hours: '0.5', includes: [] },
    ])
    expect(accessHours(['TOP'], steps)).toBe('2')
    expect(accessHours(['L', 'R'], steps)).toBe('1')
    expect(accessHours([], steps)).toBe('0')
  })
})
