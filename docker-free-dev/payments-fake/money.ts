/**
 * Currency facts the fake needs, from Stripe's "Supported currencies" page
 * (https://docs.stripe.com/currencies), written down from memory of that page:
 * which currencies Stripe treats as zero- or three-decimal, the minimum charge per
 * currency, and the eight-digit maximum. The product's own money code lives in shared/;
 * the fake stands in for Stripe and so keeps Stripe's view apart from ours.
 */

const ZERO_DECIMAL = new Set([
  'bif',
  'clp',
  'djf',
  'gnf',
  'jpy',
  'kmf',
  'krw',
  'mga',
  'pyg',
  'rwf',
  'ugx',
  'vnd',
  'vuv',
  'xaf',
  'xof',
  'xpf',
])
const THREE_DECIMAL = new Set(['bhd', 'jod', 'kwd', 'omr', 'tnd'])

/** Minimum charge in minor units for the currencies whose minimum Stripe lists as a fixed amount. */
const MINIMUM_CHARGE: Record<string, number> = {
  usd: 50,
  aed: 200,
  aud: 50,
  bgn: 100,
  brl: 50,
  cad: 50,
  chf: 50,
  czk: 1500,
  dkk: 250,
  eur: 50,
  gbp: 30,
  hkd: 400,
  huf: 17500,
  inr: 50,
  jpy: 50,
  mxn: 1000,
  myr: 200,
  nok: 300,
  nzd: 50,
  pln: 200,
  ron: 200,
  sek: 300,
  sgd: 50,
  thb: 1000,
}

export const MAXIMUM_AMOUNT = 99_999_999

const KNOWN_CURRENCIES = new Set(Intl.supportedValuesOf('currency').map((c) => c.toLowerCase()))

export function isKnownCurrency(code: string): boolean {
  return /^[a-z]{3}$/.test(code) && KNOWN_CURRENCIES.has(code)
}

export function minorUnitDigits(currency: string): number {
  if (ZERO_DECIMAL.has(currency)) return 0
  if (THREE_DECIMAL.has(currency)) return 3
  return 2
}

export function minimumCharge(currency: string): number | undefined {
  return MINIMUM_CHARGE[currency]
}

const isNumericLiteral = (s: string): s is `${number}` => /^-?\d+(\.\d+)?$/.test(s)

/** Minor units as an exact decimal string (12345, 2 digits → "123.45"), so no float ever touches an amount. */
function toDecimalString(amount: number, digits: number): `${number}` {
  const sign = amount < 0 ? '-' : ''
  const padded = String(Math.abs(amount)).padStart(digits + 1, '0')
  const text = digits === 0 ? `${sign}${padded}` : `${sign}${padded.slice(0, -digits)}.${padded.slice(-digits)}`
  if (!isNumericLiteral(text)) throw new Error(`Not an amount in minor units: ${amount}`)
  return text
}

export function formatAmount(amount: number, currency: string, locale = 'en-GB'): string {
  const digits = minorUnitDigits(currency)
  return new Intl.NumberFormat(locale, {
    style: 'currency',
    currency: currency.toUpperCase(),
    minimumFractionDigits: digits,
    maximumFractionDigits: digits,
  }).format(toDecimalString(amount, digits))
}
