/**
 * The only place money is parsed from text, formatted or rounded.
 *
 * Amounts are integer minor units of an ISO 4217 currency, held as bigints while the engine
 * works so every product (rate × hours, net × tax rate) is exact before its single rounding.
 * Currency data and formatting come from dinero.js. The rounding itself is done here on bare
 * bigints with dinero.js's rules (`halfUp`, `down`) rather than by calling them: each call to
 * those builds a dozen closures, and on a 1,000-line estimate that was about 3 MB of extra
 * garbage per call and a quarter of the time (measured). tests/shared/money.test.ts checks these helpers
 * against dinero.js's `halfUp`/`down` and against its object API (multiply + transformScale).
 */
import type { DineroCurrency } from 'dinero.js/bigint'
import { dinero, toDecimal } from 'dinero.js/bigint'
import * as dineroCurrencies from 'dinero.js/bigint/currencies'

export type Currency = DineroCurrency<bigint>

/**
 * dinero.js currencies the engine refuses, with the reason. Every other dinero.js currency is
 * cross-checked against the ISO 4217 list in tests/shared/estimate.currencies.test.ts.
 */
export const EXCLUDED_CURRENCIES: Readonly<Record<string, string>> = {
  MGA: 'dinero.js models it as base 5 with one minor digit; ISO 4217 lists 2 decimal digits',
  MRU: 'dinero.js models it as base 5 with one minor digit; ISO 4217 lists 2 decimal digits',
  XAD: 'not in the pinned ISO 4217 data (currency-codes 2.2.0), so its minor unit cannot be cross-checked',
  XCG: 'not in the pinned ISO 4217 data (currency-codes 2.2.0), so its minor unit cannot be cross-checked',
}

const currencies: ReadonlyMap<string, Currency> = new Map(
  (Object.values(dineroCurrencies) as Currency[]).filter((c) => !Object.hasOwn(EXCLUDED_CURRENCIES, c.code)).map((c) => [c.code, c]),
)

/** ISO 4217 codes the engine accepts, sorted. */
export const SUPPORTED_CURRENCIES: readonly string[] = [...currencies.keys()].sort()

export function isSupportedCurrency(code: string): boolean {
  return currencies.has(code)
}

export function currencyFor(code: string): Currency {
  const currency = currencies.get(code)
  if (!currency) throw new RangeError(`Unsupported currency "${code}"`)
  return currency
}

/** Number of decimal digits in the currency's minor unit: GBP 2, JPY 0, KWD 3. */
export function minorUnitExponent(code: string): number {
  return Number(currencyFor(code).exponent)
}

/**
 * The smallest card payment, in minor units, for the currencies we know it for.
 * Source: Stripe's "supported currencies / minimum charge amounts" page, recalled from memory
 * (USD 0.50, GBP 0.30, EUR 0.50), not read from the page while writing this.
 */
export const CARD_MINIMUM_CHARGE: Readonly<Record<string, number>> = {
  USD: 50,
  GBP: 30,
  EUR: 50,
}

/** 0 means no known minimum: any deposit above zero can be charged. */
export function defaultMinimumCharge(code: string): number {
  return CARD_MINIMUM_CHARGE[code] ?? 0
}

/**
 * Money as a person types it in major units ("12.50", "12.5", "1250" for yen) → integer minor units
 * of `currency`, or null when it is not a plain non-negative amount with at most the currency's
 * ISO 4217 minor digits. Parsed digit by digit (see parseMajorUnits): no float is involved.
 */
export function parseMoney(text: string, currency: string): number | null {
  return parseMajorUnits(text, minorUnitExponent(currency))
}

/**
 * "12.5" or "12.50" in major units → 1250 minor units, for a currency with `exponent` minor digits
 * (ISO 4217: GBP 2, JPY 0); null when it is not a plain amount. Parsed digit by digit: no float.
 */
export function parseMajorUnits(text: string, exponent: number): number | null {
  const pattern = exponent > 0 ? new RegExp(`^(0|[1-9]\\d*)(\\.\\d{1,${exponent}})?$`) : /^(0|[1-9]\d*)$/
  const trimmed = text.trim()
  if (!pattern.test(trimmed)) return null
  const [whole = '0', fraction = ''] = trimmed.split('.')
  const value = Number(whole) * 10 ** exponent + Number(fraction.padEnd(exponent, '0') || '0')
  return Number.isSafeInteger(value) ? value : null
}

/** 1250 → "12.50": minor units as the plain amount people type, without a currency sign. */
export function formatMajorUnits(minor: number, exponent: number): string {
  if (exponent === 0) return String(minor)
  const digits = String(minor).padStart(exponent + 1, '0')
  return `${digits.slice(0, -exponent)}.${digits.slice(-exponent)}`
}

/** Parser and formatter for money typed in major units ("12.50") and held in minor units of the currency. */
export function moneyText(currency: () => string) {
  return {
    parse: (text: string) => parseMoney(text, currency()),
    format: (minor: number) => formatMajorUnits(minor, minorUnitExponent(currency())),
  }
}

const formatters = new Map<string, Intl.NumberFormat>()

/**
 * Formats integer minor units for display, always with the currency's ISO minor digits
 * (Intl's own defaults differ for a few currencies). The amount is handed to Intl as an exact
 * decimal string, so no binary float is involved at any size.
 */
export function formatMoney(amountMinor: number, currency: string, locale = 'en-GB'): string {
  if (!Number.isSafeInteger(amountMinor)) throw new RangeError(`Amount must be an integer number of minor units, got ${amountMinor}`)
  const spec = currencyFor(currency)
  const digits = Number(spec.exponent)
  const key = `${locale}|${currency}`
  let formatter = formatters.get(key)
  if (!formatter) {
    formatter = new Intl.NumberFormat(locale, {
      style: 'currency',
      currency,
      minimumFractionDigits: digits,
      maximumFractionDigits: digits,
    })
    formatters.set(key, formatter)
  }
  const decimal = toDecimal(dinero({ amount: BigInt(amountMinor), currency: spec })) as `${number}`
  return formatter.format(decimal)
}

export type Rounding = 'half-up' | 'down'

/**
 * numerator / denominator rounded once to an integer.
 * half-up: halves go up (HMRC's "nearest penny"); down: drops the fraction (HMRC's invoice concession).
 * Money in an estimate is never negative, so negative numerators are refused rather than given a rule.
 */
export function divideRounded(numerator: bigint, denominator: bigint, rounding: Rounding): bigint {
  if (denominator <= 0n) throw new RangeError('Denominator must be positive')
  if (numerator < 0n) throw new RangeError('Amount must not be negative')
  const quotient = numerator / denominator
  if (rounding === 'down') return quotient
  const remainder = numerator - quotient * denominator
  return remainder * 2n >= denominator ? quotient + 1n : quotient
}

const powersOfTen = Array.from({ length: 16 }, (_, i) => 10n ** BigInt(i))

/** amount × (scaled / 10^places), rounded once: rate × hours, unit price × quantity, net × tax rate. */
export function multiplyRounded(amount: bigint, scaled: bigint, places: number, rounding: Rounding): bigint {
  return divideRounded(amount * scaled, powersOfTen[places] ?? 10n ** BigInt(places), rounding)
}

/**
 * Splits `total` across `weights` in proportion, by the largest-remainder method: everyone gets
 * the floor of their exact share, then the units left over go one each to the largest
 * remainders, ties to the earlier position. The shares always sum to `total`.
 *
 * dinero.js's own `allocate` is not used because it hands leftover units to the largest
 * ratios rather than the largest remainders (e.g. 2 over weights [4, 3] gives [2, 0] there,
 * [1, 1] here), and its tie order is not specified.
 */
export function allocateLargestRemainder(total: bigint, weights: readonly bigint[]): bigint[] {
  let sum = 0n
  for (const w of weights) {
    if (w < 0n) throw new RangeError('Weights must not be negative')
    sum += w
  }
  if (total === 0n || sum === 0n) return weights.map(() => 0n)
  const shares = new Array<bigint>(weights.length)
  const remainders = new Array<bigint>(weights.length)
  let left = total
  for (let i = 0; i < weights.length; i++) {
    const exact = total * (weights[i] as bigint)
    const share = exact / sum
    shares[i] = share
    remainders[i] = exact - share * sum
    left -= share
  }
  if (left > 0n) {
    for (const index of largestFirst(remainders, sum, Number(left))) shares[index] = (shares[index] as bigint) + 1n
  }
  return shares
}

/**
 * Positions of the `count` largest remainders, ties to the earlier position. When the numbers
 * allow, each (remainder, position) pair is packed into one float key so the native typed-array
 * sort can order them; a comparator sort of a thousand bigints was a visible share of the time.
 */
function largestFirst(remainders: readonly bigint[], below: bigint, count: number): number[] {
  const n = remainders.length
  if (below * BigInt(n) <= BigInt(Number.MAX_SAFE_INTEGER)) {
    const keys = new Float64Array(n)
    for (let i = 0; i < n; i++) keys[i] = Number(remainders[i] as bigint) * n + (n - 1 - i)
    keys.sort()
    const picked: number[] = []
    for (let k = n - 1; picked.length < count; k--) picked.push(n - 1 - ((keys[k] as number) % n))
    return picked
  }
  return remainders
    .map((_, i) => i)
    .sort((a, b) => {
      const ra = remainders[a] as bigint
      const rb = remainders[b] as bigint
      return ra === rb ? a - b : ra > rb ? -1 : 1
    })
    .slice(0, count)
}
