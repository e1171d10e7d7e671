/**
 * Test card numbers and what Stripe does with them, from Stripe's "Testing" page
 * (https://docs.stripe.com/testing: "Cards by brand", "Declined payments", "3D Secure
 * authentication"), written down from memory of that page. The card-form messages are
 * the ones Stripe's hosted payment page shows (from memory).
 */

export interface CardDecline {
  /** Stripe's error code (https://docs.stripe.com/error-codes). */
  code: string
  /** The issuer's reason (https://docs.stripe.com/declines/codes), where Stripe gives one. */
  declineCode?: string
  message: string
}

export type CardBehaviour =
  | { kind: 'succeed' }
  | { kind: 'decline'; decline: CardDecline }
  | { kind: 'authenticate'; afterAuthentication: { kind: 'succeed' } | { kind: 'decline'; decline: CardDecline } }

export interface TestCard {
  number: string
  brand: 'visa' | 'mastercard' | 'amex' | 'discover'
  funding: 'credit' | 'debit' | 'prepaid'
  country: string
  label: string
  behaviour: CardBehaviour
}

const generic: CardDecline = { code: 'card_declined', declineCode: 'generic_decline', message: 'Your card was declined.' }
const insufficientFunds: CardDecline = {
  code: 'card_declined',
  declineCode: 'insufficient_funds',
  message: 'Your card has insufficient funds.',
}
const succeed = { kind: 'succeed' } as const
const authenticateThen = (after: CardBehaviour & { kind: 'succeed' | 'decline' }): CardBehaviour => ({
  kind: 'authenticate',
  afterAuthentication: after,
})

export const TEST_CARDS: readonly TestCard[] = [
  { number: '4242424242424242', brand: 'visa', funding: 'credit', country: 'US', label: 'Visa, succeeds', behaviour: succeed },
  { number: '4000056655665556', brand: 'visa', funding: 'debit', country: 'US', label: 'Visa debit, succeeds', behaviour: succeed },
  {
    number: '4000008260000000',
    brand: 'visa',
    funding: 'credit',
    country: 'GB',
    label: 'Visa (United Kingdom), succeeds',
    behaviour: succeed,
  },
  {
    number: '4000058260000005',
    brand: 'visa',
    funding: 'debit',
    country: 'GB',
    label: 'Visa debit (United Kingdom), succeeds',
    behaviour: succeed,
  },
  { number: '5555555555554444', brand: 'mastercard', funding: 'credit', country: 'US', label: 'Mastercard, succeeds', behaviour: succeed },
  {
    number: '2223003122003222',
    brand: 'mastercard',
    funding: 'credit',
    country: 'US',
    label: 'Mastercard (2-series), succeeds',
    behaviour: succeed,
  },
  {
    number: '5200828282828210',
    brand: 'mastercard',
    funding: 'debit',
    country: 'US',
    label: 'Mastercard debit, succeeds',
    behaviour: succeed,
  },
  {
    number: '5105105105105100',
    brand: 'mastercard',
    funding: 'prepaid',
    country: 'US',
    label: 'Mastercard prepaid, succeeds',
    behaviour: succeed,
  },
  { number: '378282246310005', brand: 'amex', funding: 'credit', country: 'US', label: 'American Express, succeeds', behaviour: succeed },
  { number: '371449635398431', brand: 'amex', funding: 'credit', country: 'US', label: 'American Express, succeeds', behaviour: succeed },
  { number: '6011111111111117', brand: 'discover', funding: 'credit', country: 'US', label: 'Discover, succeeds', behaviour: succeed },
  {
    number: '4000000000000002',
    brand: 'visa',
    funding: 'credit',
    country: 'US',
    label: 'Declined (generic decline)',
    behaviour: { kind: 'decline', decline: generic },
  },
  {
    number: '4000000000009995',
    brand: 'visa',
    funding: 'credit',
    country: 'US',
    label: 'Declined (insufficient funds)',
    behaviour: { kind: 'decline', decline: insufficientFunds },
  },
  {
    number: '4000000000009987',
    brand: 'visa',
    funding: 'credit',
    country: 'US',
    label: 'Declined (lost card)',
    behaviour: { kind: 'decline', decline: { code: 'card_declined', declineCode: 'lost_card', message: 'Your card was declined.' } },
  },
  {
    number: '4000000000009979',
    brand: 'visa',
    funding: 'credit',
    country: 'US',
    label: 'Declined (stolen card)',
    behaviour: { kind: 'decline', decline: { code: 'card_declined', declineCode: 'stolen_card', message: 'Your card was declined.' } },
  },
  {
    number: '4000000000006975',
    brand: 'visa',
    funding: 'credit',
    country: 'US',
    label: 'Declined (velocity limit exceeded)',
    behaviour: {
      kind: 'decline',
      decline: {
        code: 'card_declined',
        declineCode: 'card_velocity_exceeded',
        message: 'Your card was declined for making repeated attempts too frequently or exceeding its amount limit.',
      },
    },
  },
  {
    number: '4000000000000069',
    brand: 'visa',
    funding: 'credit',
    country: 'US',
    label: 'Declined (expired card)',
    behaviour: { kind: 'decline', decline: { code: 'expired_card', message: 'Your card has expired.' } },
  },
  {
    number: '4000000000000127',
    brand: 'visa',
    funding: 'credit',
    country: 'US',
    label: 'Declined (incorrect CVC)',
    behaviour: { kind: 'decline', decline: { code: 'incorrect_cvc', message: "Your card's security code is incorrect." } },
  },
  {
    number: '4000000000000119',
    brand: 'visa',
    funding: 'credit',
    country: 'US',
    label: 'Declined (processing error)',
    behaviour: {
      kind: 'decline',
      decline: { code: 'processing_error', message: 'An error occurred while processing your card. Try again in a little bit.' },
    },
  },
  {
    number: '4000002760003184',
    brand: 'visa',
    funding: 'credit',
    country: 'US',
    label: 'Asks for authentication on every payment',
    behaviour: authenticateThen(succeed),
  },
  {
    number: '4000002500003155',
    brand: 'visa',
    funding: 'credit',
    country: 'US',
    label: 'Asks for authentication (on-session payments)',
    behaviour: authenticateThen(succeed),
  },
  {
    number: '4000000000003220',
    brand: 'visa',
    funding: 'credit',
    country: 'US',
    label: 'Asks for 3D Secure 2 authentication',
    behaviour: authenticateThen(succeed),
  },
  {
    number: '4000000000003063',
    brand: 'visa',
    funding: 'credit',
    country: 'US',
    label: 'Asks for 3D Secure authentication',
    behaviour: authenticateThen(succeed),
  },
  {
    number: '4000008260003178',
    brand: 'visa',
    funding: 'credit',
    country: 'GB',
    label: 'Asks for authentication, then declined (insufficient funds)',
    behaviour: authenticateThen({ kind: 'decline', decline: insufficientFunds }),
  },
  {
    number: '4000008400001629',
    brand: 'visa',
    funding: 'credit',
    country: 'US',
    label: 'Asks for authentication, then declined',
    behaviour: authenticateThen({ kind: 'decline', decline: generic }),
  },
]

/** A well-formed card that is not a test card: Stripe's test mode refuses real cards. */
export const LIVE_CARD_IN_TEST_MODE: CardDecline = {
  code: 'card_declined',
  declineCode: 'test_mode_live_card',
  message:
    'Your card was declined. Your request was in test mode, but used a non test (live) card. For a list of valid test cards, visit: https://stripe.com/docs/testing.',
}

/** Stripe's wording when a 3D Secure challenge is failed (error code payment_intent_authentication_failure). */
export const AUTHENTICATION_FAILED_MESSAGE =
  'The provided PaymentMethod has failed authentication. You can provide payment_method_data or a new PaymentMethod to attempt to fulfill this PaymentIntent again.'

export interface CardInput {
  number: string
  expMonth: number
  expYear: number
  cvc: string
}

export type CardField = 'card_number' | 'card_expiry' | 'card_cvc'

function luhnValid(digits: string): boolean {
  let sum = 0
  for (let i = 0; i < digits.length; i++) {
    let d = Number(digits[digits.length - 1 - i])
    if (i % 2 === 1) {
      d *= 2
      if (d > 9) d -= 9
    }
    sum += d
  }
  return sum % 10 === 0
}

export function brandOf(number: string): TestCard['brand'] | 'unknown' {
  if (/^4/.test(number)) return 'visa'
  if (/^(5[1-5]|2[2-7])/.test(number)) return 'mastercard'
  if (/^3[47]/.test(number)) return 'amex'
  if (/^(6011|65)/.test(number)) return 'discover'
  return 'unknown'
}

/**
 * Checks the card form as Stripe's payment page does before anything is sent for
 * authorisation: a malformed card never reaches the PaymentIntent.
 */
export function readCardForm(
  form: { number?: string; expiry?: string; cvc?: string },
  now: Date,
): { card: CardInput; errors: [] } | { card?: undefined; errors: Array<{ field: CardField; message: string }> } {
  const errors: Array<{ field: CardField; message: string }> = []
  const number = (form.number ?? '').replace(/[\s-]/g, '')
  if (number === '' || (/^\d+$/.test(number) && number.length < 13))
    errors.push({ field: 'card_number', message: 'Your card number is incomplete.' })
  else if (!/^\d{13,19}$/.test(number) || !luhnValid(number)) errors.push({ field: 'card_number', message: 'Your card number is invalid.' })

  let expMonth = 0
  let expYear = 0
  const expiry = /^\s*(\d{1,2})\s*\/?\s*(\d{2}|\d{4})\s*$/.exec(form.expiry ?? '')
  if (!expiry) {
    errors.push({ field: 'card_expiry', message: "Your card's expiration date is incomplete." })
  } else {
    expMonth = Number(expiry[1])
    expYear = expiry[2]!.length === 2 ? 2000 + Number(expiry[2]) : Number(expiry[2])
    const thisYear = now.getUTCFullYear()
    const thisMonth = now.getUTCMonth() + 1
    if (expMonth < 1 || expMonth > 12) errors.push({ field: 'card_expiry', message: "Your card's expiration date is invalid." })
    else if (expYear < thisYear) errors.push({ field: 'card_expiry', message: "Your card's expiration year is in the past." })
    else if (expYear === thisYear && expMonth < thisMonth)
      errors.push({ field: 'card_expiry', message: "Your card's expiration date is in the past." })
    else if (expYear > thisYear + 50) errors.push({ field: 'card_expiry', message: "Your card's expiration year is invalid." })
  }

  const cvc = (form.cvc ?? '').trim()
  const cvcLength = brandOf(number) === 'amex' ? 4 : 3
  if (!/^\d*$/.test(cvc)) errors.push({ field: 'card_cvc', message: "Your card's security code is invalid." })
  else if (cvc.length < cvcLength) errors.push({ field: 'card_cvc', message: "Your card's security code is incomplete." })
  else if (cvc.length > cvcLength) errors.push({ field: 'card_cvc', message: "Your card's security code is invalid." })

  if (errors.length > 0) return { errors }
  return { card: { number, expMonth, expYear, cvc }, errors: [] }
}

export function testCardFor(number: string): TestCard | undefined {
  return TEST_CARDS.find((c) => c.number === number)
}
