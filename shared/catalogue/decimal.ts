/**
 * Hours and percentages travel as decimal strings ("1.5", "32.25") and are added or compared as
 * integers in hundredths, so no binary float ever touches a book time or a markup.
 */

/** Hours and percentages carry at most two decimal places: tenths are the trade's unit, hundredths allowed. */
export const PLACES = 2
const SCALE = 100

/** A plain non-negative decimal with up to two places, as accepted from forms and CSV files. */
export const decimalPattern = /^(0|[1-9]\d*)(\.\d{1,2})?$/

/** "1.5" → 150. Throws on anything decimalPattern refuses. */
export function toHundredths(text: string): number {
  if (!decimalPattern.test(text)) throw new RangeError(`Not a decimal with at most ${PLACES} places: "${text}"`)
  const [whole = '0', fraction = ''] = text.split('.')
  const value = Number(whole) * SCALE + Number(fraction.padEnd(PLACES, '0'))
  if (!Number.isSafeInteger(value)) throw new RangeError(`Too large: "${text}"`)
  return value
}

/** 150 → "1.5"; the shortest form, so "1.50" from a numeric column reads as "1.5". */
export function fromHundredths(value: number): string {
  if (!Number.isSafeInteger(value) || value < 0) throw new RangeError(`Not a non-negative whole number of hundredths: ${value}`)
  const whole = Math.floor(value / SCALE)
  const fraction = String(value % SCALE)
    .padStart(PLACES, '0')
    .replace(/0+$/, '')
  return fraction ? `${whole}.${fraction}` : String(whole)
}

/** PostgreSQL's numeric(…, 2) answers "1.50"; the API answers "1.5". */
export function normalizeDecimal(text: string): string {
  return fromHundredths(toHundredths(text))
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
