/**
 * Text messages, for every runtime: how many segments (billable SMS parts) a text needs, and a typed
 * phone number turned into E.164, the form the provider takes and the database keeps.
 */
import { type CountryCode, ParseError, type PhoneNumber, parsePhoneNumberWithError, validatePhoneNumberLength } from 'libphonenumber-js'

/**
 * The GSM 7-bit default alphabet of 3GPP TS 23.038 §6.2.1, in table order, without the escape code
 * (0x1B) that leads into the extension table. Each of these takes one septet.
 */
const GSM7_BASIC = new Set(
  '@£$¥èéùìòÇ\nØø\rÅåΔ_ΦΓΛΩΠΨΣΘΞÆæßÉ !"#¤%&\'()*+,-./0123456789:;<=>?¡ABCDEFGHIJKLMNOPQRSTUVWXYZÄÖÑÜ§¿abcdefghijklmnopqrstuvwxyzäöñüà',
)

/** The extension table of TS 23.038 §6.2.1.1 (form feed, ^ { } \ [ ~ ] | €): escape + code, two septets each. */
const GSM7_EXTENSION = new Set('\f^{}\\[~]|€')

/**
 * Units a segment holds. 140 octets of user data carry 160 septets or 70 UCS-2 units; concatenated
 * parts spend 6 octets on the user data header, leaving 153 septets or 67 units (Twilio, "What the
 * heck is a segment?" and its Messaging Segment Calculator).
 */
const CAPACITY = {
  'GSM-7': { single: 160, concatenated: 153 },
  'UCS-2': { single: 70, concatenated: 67 },
} as const

export type SmsEncoding = keyof typeof CAPACITY

export interface SmsSegments {
  encoding: SmsEncoding
  /** Septets for GSM-7, UTF-16 code units for UCS-2. */
  units: number
  /** 0 for an empty text: nothing would be sent (the provider refuses an empty body). */
  segments: number
}

/**
 * The segments a text needs as an SMS. One character outside the GSM-7 alphabet (an em dash, a
 * curly quote, an emoji) makes the whole text UCS-2, where a character beyond the Basic
 * Multilingual Plane takes two units. A two-unit character is never split between two parts, so it
 * moves whole to the next one, as Twilio's segment calculator does.
 */
export function smsSegments(text: string): SmsSegments {
  const characters = [...text]
  const encoding: SmsEncoding = characters.every((c) => GSM7_BASIC.has(c) || GSM7_EXTENSION.has(c)) ? 'GSM-7' : 'UCS-2'
  const costs = characters.map((c) => (encoding === 'GSM-7' ? (GSM7_EXTENSION.has(c) ? 2 : 1) : c.length))
  const units = costs.reduce((sum, cost) => sum + cost, 0)
  const capacity = CAPACITY[encoding]
  if (units === 0) return { encoding, units, segments: 0 }
  if (units <= capacity.single) return { encoding, units, segments: 1 }
  let segments = 1
  let used = 0
  for (const cost of costs) {
    if (used + cost > capacity.concatenated) {
      segments += 1
      used = 0
    }
    used += cost
  }
  return { encoding, units, segments }
}

export type PhoneRefusal = 'empty' | 'not_a_number' | 'invalid_country' | 'too_short' | 'too_long' | 'invalid_length' | 'extension'

export type NormalisedPhone = { ok: true; e164: string } | { ok: false; reason: PhoneRefusal; message: string }

const REFUSALS: Record<PhoneRefusal, string> = {
  empty: 'Enter a phone number.',
  not_a_number: 'This is not a phone number: use digits, with spaces or dashes if you like, and + before a country code.',
  invalid_country: 'Start the number with + and its country code (for example +44), or check the country code.',
  too_short: 'This number is too short.',
  too_long: 'This number is too long.',
  invalid_length: 'This number has the wrong number of digits for its country.',
  extension: 'A text cannot go to an extension: enter the number without it.',
}

const refuse = (reason: PhoneRefusal): NormalisedPhone => ({ ok: false, reason, message: REFUSALS[reason] })

/**
 * A phone number as typed ("07700 900123", "+44 (0)7700 900123", "0044 7700 900123") in E.164
 * ("+447700900123"), numbers without a country code read as `defaultCountry`'s. The whole input must
 * be the number (libphonenumber-js `extract: false`), so "call 07700 900123" is refused.
 *
 * Checked by length for the country (libphonenumber-js `isPossible`), not against the numbering
 * plan (`isValid`): the plan in a bundled copy of the metadata goes out of date as ranges are
 * allocated, and it rejects the ranges Ofcom keeps for drama and testing (07700 900xxx), which the
 * demo data and tests use. A mistyped number of a possible length still gets through; the
 * provider's refusal then says so.
 */
export function normalisePhone(input: string, defaultCountry: CountryCode = 'GB'): NormalisedPhone {
  const text = input.trim()
  if (!text) return refuse('empty')
  let parsed: PhoneNumber
  try {
    parsed = parsePhoneNumberWithError(text, { defaultCountry, extract: false })
  } catch (err) {
    if (err instanceof ParseError) return refuse(isLengthReason(err.message) ? LENGTH_REFUSALS[err.message] : 'not_a_number')
    throw err
  }
  if (!parsed.isPossible()) return refuse(LENGTH_REFUSALS[validatePhoneNumberLength(parsed.number) ?? 'INVALID_LENGTH'])
  if (parsed.ext) return refuse('extension')
  return { ok: true, e164: parsed.number }
}

type LengthReason = NonNullable<ReturnType<typeof validatePhoneNumberLength>>

/** libphonenumber-js's reasons, which its ParseError also carries as its message. */
const LENGTH_REFUSALS: Record<LengthReason, PhoneRefusal> = {
  NOT_A_NUMBER: 'not_a_number',
  INVALID_COUNTRY: 'invalid_country',
  TOO_SHORT: 'too_short',
  TOO_LONG: 'too_long',
  INVALID_LENGTH: 'invalid_length',
}

const isLengthReason = (value: string): value is LengthReason => Object.hasOwn(LENGTH_REFUSALS, value)
