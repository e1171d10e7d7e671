/**
 * Decimal text — hours, quantities, tax rates, percentages, measurements ("1.8", "20", "0.125") —
 * read, written, compared and normalised as integers scaled by a fixed power of ten (`places`), so no
 * binary float ever touches a book time, a price factor or a reading. Money typed in major units is
 * shared/money.ts's.
 *
 * Callers disagree on two points, so each behaviour has its own name:
 * - how many digits may stand before the point: the estimate contract allows nine (decimalPattern),
 *   the catalogue any number, checked by size after parsing (hundredthsPattern, toHundredths);
 * - what happens to digits past `places`: parseScaled refuses them; truncateScaled (inspection
 *   readings, which are typed to any precision) drops them.
 */

/** Decimal places each kind of quantity may carry. Tenths of an hour are the trade's unit; hundredths are allowed. */
export const HOURS_PLACES = 2
export const QUANTITY_PLACES = 3
export const PERCENT_PLACES = 2

/** The estimate contract's form: no leading zero, at most nine digits before the point and `places` after it. */
export function decimalPattern(places: number): RegExp {
  return new RegExp(`^(0|[1-9]\\d{0,8})(\\.\\d{1,${places}})?$`)
}

/** The catalogue's form, from its forms and CSV files: no leading zero, any digits before the point, at most two after. */
export const hundredthsPattern = /^(0|[1-9]\d*)(\.\d{1,2})?$/

/** A reading as typed off a gauge: digits with an optional fraction of any length, leading zeros allowed. */
export const readingPattern = /^\d+(\.\d+)?$/

/**
 * "1.8" with 2 places → 180n. Throws on anything that is not a plain non-negative decimal with at
 * most `places` places (no leading zero, any number of digits before the point). Parsed by hand
 * because a large estimate has thousands of these and a regular expression plus BigInt(string) per
 * value was a measurable share of the time.
 */
export function parseScaled(text: string, places: number): bigint {
  let value = 0
  let fractionDigits = -1
  for (let k = 0; k < text.length; k++) {
    const c = text.charCodeAt(k)
    if (c === 46 /* . */ && fractionDigits < 0 && k > 0 && k < text.length - 1) {
      fractionDigits = 0
      continue
    }
    if (c < 48 || c > 57 || (k === 1 && text.charCodeAt(0) === 48 && c !== 46)) throw notDecimal(text, places)
    value = value * 10 + (c - 48)
    if (fractionDigits >= 0) fractionDigits++
  }
  if (text.length === 0 || fractionDigits > places) throw notDecimal(text, places)
  for (let k = Math.max(fractionDigits, 0); k < places; k++) value *= 10
  // Beyond 2^53 the digits above may have been rounded; start again exactly.
  if (!Number.isSafeInteger(value)) {
    const [whole = '', fraction = ''] = text.split('.')
    return BigInt(whole + fraction.padEnd(places, '0'))
  }
  return BigInt(value)
}

function notDecimal(text: string, places: number): RangeError {
  return new RangeError(`Not a decimal with at most ${places} places: "${text}"`)
}

/** The shortest decimal string for a non-negative scaled integer: 180n with 2 places → "1.8". */
export function formatScaled(value: bigint | number, places: number): string {
  // Most lines share nothing, so "0" is by far the most common call.
  if (value === 0 || value === 0n) return '0'
  const digits = value.toString().padStart(places + 1, '0')
  const whole = digits.slice(0, digits.length - places)
  const fraction = digits.slice(digits.length - places).replace(/0+$/, '')
  return fraction ? `${whole}.${fraction}` : whole
}

/**
 * A non-negative decimal string as a count of 10^-places units, digits past `places` dropped (not
 * rounded, not refused). For text already checked against readingPattern.
 */
export function truncateScaled(text: string, places: number): bigint {
  const [whole = '0', fraction = ''] = text.split('.')
  return BigInt(whole + fraction.padEnd(places, '0').slice(0, places))
}

/** Compares two readings to `places` places, digits past them dropped: with 6 places "0.1250001" equals "0.125". */
export function compareTruncated(a: string, b: string, places: number): -1 | 0 | 1 {
  const x = truncateScaled(a, places)
  const y = truncateScaled(b, places)
  return x < y ? -1 : x > y ? 1 : 0
}

/** Catalogue hours and percentages carry at most two places and are added as safe integers of hundredths. */
const HUNDREDTHS_PLACES = 2

/** "1.5" → 150. Throws on anything hundredthsPattern refuses, and on a value past the safe-integer range. */
export function toHundredths(text: string): number {
  const value = parseScaled(text, HUNDREDTHS_PLACES)
  if (value > BigInt(Number.MAX_SAFE_INTEGER)) throw new RangeError(`Too large: "${text}"`)
  return Number(value)
}

/** 150 → "1.5"; the shortest form, so "1.50" from a numeric column reads as "1.5". */
export function fromHundredths(value: number): string {
  if (!Number.isSafeInteger(value) || value < 0) throw new RangeError(`Not a non-negative whole number of hundredths: ${value}`)
  return formatScaled(value, HUNDREDTHS_PLACES)
}

/** PostgreSQL's numeric(…, 2) answers "1.50"; the API answers "1.5". */
export function normalizeDecimal(text: string): string {
  return fromHundredths(toHundredths(text))
}
