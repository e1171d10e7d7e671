import { errors, type FakeTwilioError } from './errors'

/**
 * Twilio's "magic" numbers for its test credentials (Twilio docs, "Test Credentials",
 * https://www.twilio.com/docs/iam/test-credentials, section "Test SMS messages"). The page's
 * introduction was read for this work; the table's numbers and error codes below are from memory of
 * it, and agree with the `twilio_magic_values` Elixir package's copy of the table.
 *
 * Twilio gives these meanings only under test credentials, and validates other numbers normally;
 * the fake applies them to every account, since every account here is a test one.
 */
export const MAGIC_FROM = {
  /** "This phone number is invalid": 21212. */
  invalid: '+15005550001',
  /** "This phone number is not owned by your account or is not SMS-capable": 21606. */
  notOwned: '+15005550007',
  /** "This number has an SMS message queue that is full": 21611. */
  queueFull: '+15005550008',
  /** "This number passes all validation": the one From that test credentials accept. */
  valid: '+15005550006',
} as const

export const MAGIC_TO = {
  /** "This phone number is invalid": 21211. */
  invalid: '+15005550001',
  /** "Twilio cannot route to this number": 21612. */
  cannotRoute: '+15005550002',
  /** "Your account doesn't have the international permissions necessary to SMS this number": 21408. */
  noInternationalPermission: '+15005550003',
  /** "This number is blocked for your account": 21610. */
  blocked: '+15005550004',
  /** "This number is incapable of receiving SMS messages": 21614. */
  notSmsCapable: '+15005550009',
} as const

const FROM_REFUSALS: Record<string, (from: string) => FakeTwilioError> = {
  [MAGIC_FROM.invalid]: errors.invalidFrom,
  [MAGIC_FROM.notOwned]: errors.fromNotOwned,
  [MAGIC_FROM.queueFull]: errors.fromQueueFull,
}

const TO_REFUSALS: Record<string, (to: string, from: string) => FakeTwilioError> = {
  [MAGIC_TO.invalid]: (to) => errors.invalidTo(to),
  [MAGIC_TO.cannotRoute]: errors.notRoutable,
  [MAGIC_TO.noInternationalPermission]: (to) => errors.noRegionPermission(to),
  [MAGIC_TO.blocked]: () => errors.unsubscribed(),
  [MAGIC_TO.notSmsCapable]: (to) => errors.notMobile(to),
}

export const fromRefusal = (from: string): FakeTwilioError | undefined => FROM_REFUSALS[from]?.(from)
export const toRefusal = (to: string, from: string): FakeTwilioError | undefined => TO_REFUSALS[to]?.(to, from)

export interface DeliveryFailure {
  errorCode: number
  errorMessage: string
}

/**
 * Twilio has no magic number for a text that is accepted and then not delivered (test credentials
 * never reach a handset), so these are the fake's own, next to Twilio's in the same +1 500 555
 * range. The error codes are Twilio's carrier-reported ones (Twilio, "Error and warning
 * dictionary", 30003 and 30005; descriptions from memory); the message ends `undelivered`, the
 * status Twilio gives when a carrier reports that a sent text did not arrive.
 */
export const DELIVERY_FAILURES: Readonly<Record<string, DeliveryFailure>> = {
  '+15005550010': { errorCode: 30003, errorMessage: 'Unreachable destination handset' },
  '+15005550011': { errorCode: 30005, errorMessage: 'Unknown destination handset' },
}
