/**
 * ISO 4217 minor units: every currency the engine accepts is checked against the ISO list as
 * packaged by currency-codes (pinned at 2.2.0), and the KWD (3 digits) and JPY (0 digits) cases
 * are priced end to end. Prices and tax rates in the worked cases are invented; the expected
 * figures are worked by hand from the rules.
 */
import { createRequire } from 'node:module'
import cc from 'currency-codes'
import * as dineroCurrencies from 'dinero.js/bigint/currencies'
import { describe, expect, it } from 'vitest'
import { calculateEstimate } from '../../shared/estimate'
import { EXCLUDED_CURRENCIES, formatMoney, minorUnitExponent, SUPPORTED_CURRENCIES } from '../../shared/money'
import { estimate, fee, item, labour, part } from './estimate-helpers'

describe('ISO 4217 minor units', () => {
  it('uses the pinned ISO data', () => {
    // If this changes, re-run the cross-check below and revisit EXCLUDED_CURRENCIES.
    const pkg = createRequire(import.meta.url)('currency-codes/package.json') as { version: string }
    expect(pkg.version).toBe('2.2.0')
  })

  it.each(SUPPORTED_CURRENCIES)('%s has the ISO number of minor digits', (code) => {
    const iso = cc.code(code)
    expect(iso, `${code} is not in the ISO list`).toBeDefined()
    expect(minorUnitExponent(code)).toBe(iso!.digits)
  })

  it.each([
    // Source: ISO 4217 (via currency-codes 2.2.0).
    { code: 'GBP', digits: 2 },
    { code: 'EUR', digits: 2 },
    { code: 'USD', digits: 2 },
    { code: 'JPY', digits: 0 },
    { code: 'KWD', digits: 3 },
  ])('$code has $digits minor digits', ({ code, digits }) => {
    expect(cc.code(code)?.digits).toBe(digits)
    expect(minorUnitExponent(code)).toBe(digits)
  })

  it('excludes exactly the dinero.js currencies the ISO data disagrees with or lacks', () => {
    const all = Object.values(dineroCurrencies) as { code: string; base: bigint; exponent: bigint }[]
    const disagreeing = all.filter((c) => c.base !== 10n || cc.code(c.code)?.digits !== Number(c.exponent)).map((c) => c.code)
    expect(disagreeing.sort()).toEqual(Object.keys(EXCLUDED_CURRENCIES).sort())
    expect(SUPPORTED_CURRENCIES).toEqual(
      all
        .map((c) => c.code)
        .filter((code) => !disagreeing.includes(code))
        .sort(),
    )
  })
})

describe('KWD end to end (3 minor digits: fils)', () => {
  // KWD 12.345 an hour × 1.25 h = 15.43125 → 15.431; 3 × KWD 1.235 = 3.705; fee 0.750. Net 19.886.
  // Tax at an invented 5%: per line 0.77155 → 0.772, 0.18525 → 0.185, 0.0375 → 0.038 = 0.995;
  // on the total 0.9943 → 0.994 whether rounded half-up or down.
  const kwd = (taxRounding: 'per-line' | 'per-invoice' | 'per-invoice-down') =>
    calculateEstimate(
      estimate({
        currency: 'KWD',
        taxRounding,
        items: [item('a', 'approved', [labour('1.25', 12345, '5'), part('3', 1235, '5'), fee(750, '5')])],
      }),
    )

  it.each([
    { taxRounding: 'per-line', tax: 995, gross: 20881, shown: 'KWD\u00a020.881' },
    { taxRounding: 'per-invoice', tax: 994, gross: 20880, shown: 'KWD\u00a020.880' },
    { taxRounding: 'per-invoice-down', tax: 994, gross: 20880, shown: 'KWD\u00a020.880' },
  ] as const)('$taxRounding', ({ taxRounding, tax, gross, shown }) => {
    const result = kwd(taxRounding)
    expect(result.exponent).toBe(3)
    expect(result.approved.lines.map((l) => l.amount)).toEqual([15431, 3705, 750])
    expect(result.approved).toMatchObject({ net: 19886, tax, gross })
    expect(formatMoney(result.approved.gross, 'KWD')).toBe(shown)
  })
})

describe('JPY end to end (no minor digits)', () => {
  // ¥8,000 an hour × 1.35 h = ¥10,800; ¥1,999; 2.5 × ¥1,234 = ¥3,085. Net ¥15,884.
  // Tax at 10%: per line 1,080 + 199.9 → 200 + 308.5 → 309 = 1,589; on the total 1,588.4 → 1,588.
  it.each([
    { taxRounding: 'per-line', tax: 1589, gross: 17473, deposit: 8737, shown: 'JP¥17,473' }, // 8736.5 → 8737
    { taxRounding: 'per-invoice', tax: 1588, gross: 17472, deposit: 8736, shown: 'JP¥17,472' },
    { taxRounding: 'per-invoice-down', tax: 1588, gross: 17472, deposit: 8736, shown: 'JP¥17,472' },
  ] as const)('$taxRounding', ({ taxRounding, tax, gross, deposit, shown }) => {
    const result = calculateEstimate(
      estimate({
        currency: 'JPY',
        taxRounding,
        items: [item('a', 'approved', [labour('1.35', 8000, '10'), part('1', 1999, '10'), part('2.5', 1234, '10')])],
        deposit: { kind: 'percent', value: '50' },
      }),
    )
    expect(result.exponent).toBe(0)
    expect(result.approved.lines.map((l) => l.amount)).toEqual([10800, 1999, 3085])
    expect(result.approved).toMatchObject({ net: 15884, tax, gross, deposit })
    expect(formatMoney(result.approved.gross, 'JPY')).toBe(shown)
  })

  it('takes tax out of yen prices that include it', () => {
    // ¥8,800 an hour including 10% × 1.35 h = ¥11,880, of which 11,880 × 10/110 = ¥1,080 is tax.
    const result = calculateEstimate(
      estimate({ currency: 'JPY', taxMode: 'inclusive', items: [item('a', 'approved', [labour('1.35', 8800, '10')])] }),
    )
    expect(result.approved).toMatchObject({ gross: 11880, tax: 1080, net: 10800 })
  })
})
