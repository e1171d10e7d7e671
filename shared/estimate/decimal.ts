/**
 * Hours, quantities, tax rates and percentages arrive as decimal strings ("1.8", "20") and are
 * held as integers scaled by a fixed power of ten, so no binary float ever touches a price.
 */

/** Decimal places each kind of quantity may carry. Tenths of an hour are the trade's unit; hundredths are allowed. */
export const HOURS_PLACES = 2
export const QUANTITY_PLACES = 3
export const PERCENT_PLACES = 2

export function decimalPattern(places: number): RegExp {
  return new RegExp(`^(0|[1-9]\\d{0,8})(\\.\\d{1,${places}})?$`)
}

/**
 * "1.8" with 2 places → 180n. Throws on anything that is not a plain non-negative decimal with
 * at most `places` places. Parsed by hand because a large estimate has thousands of these and
 * a regular expression plus BigInt(string) per value was a measurable share of the time.
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
