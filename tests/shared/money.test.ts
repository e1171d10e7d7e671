import { add, allocate, calculator, dinero, down, halfUp, multiply, toSnapshot, transformScale } from 'dinero.js/bigint'
import { GBP } from 'dinero.js/bigint/currencies'
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  allocateLargestRemainder,
  CARD_MINIMUM_CHARGE,
  defaultMinimumCharge,
  divideRounded,
  formatMoney,
  isSupportedCurrency,
  minorUnitExponent,
  multiplyRounded,
} from '../../shared/money'

describe('formatMoney', () => {
  // Expected strings follow CLDR's currency patterns as shipped in Node 20's ICU (which puts a
  // no-break space, \u00a0, between a code and the number); the digits after the separator follow
  // ISO 4217 minor units (GBP/EUR/USD 2, JPY 0, KWD 3, CLF 4).
  it.each([
    { amount: 123456, currency: 'GBP', locale: 'en-GB', expected: '£1,234.56' },
    { amount: 0, currency: 'GBP', locale: 'en-GB', expected: '£0.00' },
    { amount: -5, currency: 'GBP', locale: 'en-GB', expected: '-£0.05' },
    { amount: 50, currency: 'USD', locale: 'en-US', expected: '$0.50' },
    { amount: 123456, currency: 'EUR', locale: 'de-DE', expected: '1.234,56\u00a0€' },
    { amount: 1234, currency: 'JPY', locale: 'en-GB', expected: 'JP¥1,234' },
    { amount: 1234, currency: 'JPY', locale: 'ja-JP', expected: '￥1,234' },
    { amount: 1235, currency: 'KWD', locale: 'en-GB', expected: 'KWD\u00a01.235' },
    { amount: 12345, currency: 'CLF', locale: 'en-GB', expected: 'CLF\u00a01.2345' },
    // CLDR shows HUF and IQD without minor digits; ISO 4217 gives them 2 and 3, and the amount is in those units.
    { amount: 123456, currency: 'HUF', locale: 'en-GB', expected: 'HUF\u00a01,234.56' },
    { amount: 1234, currency: 'IQD', locale: 'en-GB', expected: 'IQD\u00a01.234' },
    // The largest exact integer: handed to Intl as a decimal string, so no digit is lost to a float.
    { amount: Number.MAX_SAFE_INTEGER, currency: 'GBP', locale: 'en-GB', expected: '£90,071,992,547,409.91' },
  ])('$amount $currency in $locale → $expected', ({ amount, currency, locale, expected }) => {
    expect(formatMoney(amount, currency, locale)).toBe(expected)
  })

  it('defaults to en-GB', () => {
    expect(formatMoney(30, 'GBP')).toBe(formatMoney(30, 'GBP', 'en-GB'))
  })

  it.each([
    { amount: 1.5, currency: 'GBP', error: /integer/ },
    { amount: Number.MAX_SAFE_INTEGER + 1, currency: 'GBP', error: /integer/ },
    { amount: 100, currency: 'XYZ', error: /Unsupported currency "XYZ"/ },
    { amount: 100, currency: 'MGA', error: /Unsupported currency "MGA"/ },
  ])('refuses $amount $currency', ({ amount, currency, error }) => {
    expect(() => formatMoney(amount, currency)).toThrow(error)
  })
})

describe('currency helpers', () => {
  it.each([
    // ISO 4217 minor units (source: the ISO 4217 list, via currency-codes 2.2.0 in the currencies test).
    { code: 'GBP', exponent: 2 },
    { code: 'EUR', exponent: 2 },
    { code: 'USD', exponent: 2 },
    { code: 'JPY', exponent: 0 },
    { code: 'KWD', exponent: 3 },
  ])('$code has $exponent minor digits', ({ code, exponent }) => {
    expect(isSupportedCurrency(code)).toBe(true)
    expect(minorUnitExponent(code)).toBe(exponent)
  })

  it.each([
    // Source: Stripe's published minimum charge amounts, recalled from memory (not read here): USD 0.50, GBP 0.30, EUR 0.50.
    { code: 'USD', minimum: 50 },
    { code: 'GBP', minimum: 30 },
    { code: 'EUR', minimum: 50 },
    // No figure is held for these, so no minimum is applied unless the estimate gives one.
    { code: 'JPY', minimum: 0 },
    { code: 'KWD', minimum: 0 },
  ])('$code card minimum is $minimum minor units', ({ code, minimum }) => {
    expect(defaultMinimumCharge(code)).toBe(minimum)
  })

  it('holds a card minimum only for currencies the engine accepts', () => {
    for (const code of Object.keys(CARD_MINIMUM_CHARGE)) expect(isSupportedCurrency(code)).toBe(true)
  })
})

describe('rounding', () => {
  it.each([
    // Worked by hand: half-up sends exact halves up, down drops any fraction.
    { n: 25n, d: 10n, rounding: 'half-up', expected: 3n },
    { n: 24n, d: 10n, rounding: 'half-up', expected: 2n },
    { n: 26n, d: 10n, rounding: 'half-up', expected: 3n },
    { n: 29n, d: 10n, rounding: 'down', expected: 2n },
    { n: 20n, d: 10n, rounding: 'down', expected: 2n },
    { n: 1001n, d: 6n, rounding: 'half-up', expected: 167n },
    { n: 1003n, d: 2n, rounding: 'half-up', expected: 502n },
    { n: 0n, d: 7n, rounding: 'half-up', expected: 0n },
    { n: 10n ** 30n + 5n, d: 10n, rounding: 'half-up', expected: 10n ** 29n + 1n },
  ] as const)('$n / $d $rounding → $expected', ({ n, d, rounding, expected }) => {
    expect(divideRounded(n, d, rounding)).toBe(expected)
  })

  it('refuses a zero denominator and a negative amount', () => {
    expect(() => divideRounded(1n, 0n, 'half-up')).toThrow(RangeError)
    expect(() => divideRounded(-1n, 2n, 'half-up')).toThrow(RangeError)
  })

  it('rounds exactly as dinero.js halfUp and down do', () => {
    // Denominators are drawn so that exact halves are common, since that is where rules differ.
    fc.assert(
      fc.property(fc.bigInt({ min: 0n, max: 10n ** 20n }), fc.bigInt({ min: 1n, max: 10n ** 6n }), fc.boolean(), (n, d, makeHalf) => {
        const numerator = makeHalf ? n * 2n * d + d : n
        const denominator = makeHalf ? 2n * d : d
        expect(divideRounded(numerator, denominator, 'half-up')).toBe(halfUp(numerator, denominator, calculator))
        expect(divideRounded(numerator, denominator, 'down')).toBe(down(numerator, denominator, calculator))
      }),
      { numRuns: 500 },
    )
  })

  it('multiplyRounded gives the same minor units as dinero.js multiply + transformScale', () => {
    // The engine keeps bigints between steps instead of Dinero objects; this checks that shortcut
    // against dinero.js's own object API for both rounding directions.
    fc.assert(
      fc.property(
        fc.bigInt({ min: 0n, max: 10n ** 12n }),
        fc.bigInt({ min: 0n, max: 10n ** 7n }),
        fc.integer({ min: 0, max: 4 }),
        fc.constantFrom('half-up' as const, 'down' as const),
        (amount, scaled, places, rounding) => {
          const viaDinero = transformScale(
            multiply(dinero({ amount, currency: GBP }), { amount: scaled, scale: BigInt(places) }),
            GBP.exponent,
            rounding === 'half-up' ? halfUp : down,
          )
          expect(multiplyRounded(amount, scaled, places, rounding)).toBe(toSnapshot(viaDinero).amount)
        },
      ),
      { numRuns: 300 },
    )
  })

  it('dinero.js addition of the shares gives back the total', () => {
    const shares = allocateLargestRemainder(1001n, [3n, 3n, 1n])
    const total = shares.map((amount) => dinero({ amount, currency: GBP })).reduce((a, b) => add(a, b))
    expect(toSnapshot(total).amount).toBe(1001n)
  })
})

describe('allocateLargestRemainder', () => {
  it.each([
    // Worked by hand. 2 over [4, 3]: exact 1.143 and 0.857; floors 1 and 0; the larger remainder (0.857) takes the spare unit.
    { total: 2n, weights: [4n, 3n], expected: [1n, 1n] },
    // 100 over three equal weights: 33 each and one spare; equal remainders, so the earliest line takes it.
    { total: 100n, weights: [1n, 1n, 1n], expected: [34n, 33n, 33n] },
    // 2 over three equal weights: equal remainders, so the first two lines take the spare units.
    { total: 2n, weights: [5n, 5n, 5n], expected: [1n, 1n, 0n] },
    // Exact shares need no spare units.
    { total: 10n, weights: [5n, 1n, 4n], expected: [5n, 1n, 4n] },
    // Zero-weight lines get nothing.
    { total: 7n, weights: [0n, 2n, 0n, 5n], expected: [0n, 2n, 0n, 5n] },
    { total: 0n, weights: [3n, 4n], expected: [0n, 0n] },
    { total: 5n, weights: [0n, 0n], expected: [0n, 0n] },
    { total: 5n, weights: [], expected: [] },
  ])('$total over $weights → $expected', ({ total, weights, expected }) => {
    expect(allocateLargestRemainder(total, weights)).toEqual(expected)
  })

  it('differs from dinero.js allocate, which hands spare units to the largest ratio', () => {
    // Why the engine has its own allocation: the issue asks for the largest remainder.
    const viaDinero = allocate(dinero({ amount: 2n, currency: GBP }), [4n, 3n]).map((d) => toSnapshot(d).amount)
    expect(viaDinero).toEqual([2n, 0n])
    expect(allocateLargestRemainder(2n, [4n, 3n])).toEqual([1n, 1n])
  })

  it('shares always sum to the total and stay within one unit of the exact share', () => {
    fc.assert(
      fc.property(
        fc.bigInt({ min: 0n, max: 10n ** 9n }),
        fc.array(fc.bigInt({ min: 0n, max: 10n ** 6n }), { maxLength: 30 }),
        (total, weights) => {
          const shares = allocateLargestRemainder(total, weights)
          const sum = weights.reduce((a, b) => a + b, 0n)
          if (sum === 0n) {
            expect(shares.every((s) => s === 0n)).toBe(true)
            return
          }
          expect(shares.reduce((a, b) => a + b, 0n)).toBe(total)
          shares.forEach((share, i) => {
            const floor = (total * weights[i]!) / sum
            expect(share === floor || share === floor + 1n).toBe(true)
          })
        },
      ),
      { numRuns: 200 },
    )
  })

  it('hands spare units to the largest remainders, earlier first, at any size', () => {
    // A plain restatement of the method to compare with; weights up to 10^15 also exercise the
    // path taken when the remainders are too large to pack into one float.
    const plain = (total: bigint, weights: bigint[]) => {
      const sum = weights.reduce((a, b) => a + b, 0n)
      const shares = weights.map((w) => (total * w) / sum)
      let left = total - shares.reduce((a, b) => a + b, 0n)
      const order = weights.map((w, i) => ({ i, r: (total * w) % sum })).sort((a, b) => (a.r === b.r ? a.i - b.i : a.r > b.r ? -1 : 1))
      for (const { i } of order) if (left-- > 0n) shares[i]! += 1n
      return shares
    }
    const weight = fc.oneof(fc.bigInt({ min: 0n, max: 20n }), fc.bigInt({ min: 1n, max: 10n ** 15n }))
    fc.assert(
      fc.property(fc.bigInt({ min: 0n, max: 10n ** 12n }), fc.array(weight, { minLength: 1, maxLength: 30 }), (total, weights) => {
        fc.pre(weights.some((w) => w > 0n))
        expect(allocateLargestRemainder(total, weights)).toEqual(plain(total, weights))
      }),
      { numRuns: 300 },
    )
  })

  it('refuses negative weights', () => {
    expect(() => allocateLargestRemainder(1n, [1n, -1n])).toThrow(RangeError)
  })
})
