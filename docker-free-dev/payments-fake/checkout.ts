import type Stripe from 'stripe'
import {
  AUTHENTICATION_FAILED_MESSAGE,
  type CardBehaviour,
  type CardDecline,
  type CardInput,
  LIVE_CARD_IN_TEST_MODE,
  type TestCard,
  testCardFor,
} from './cards'
import { invalidRequest, parameterInvalid, parameterMissing, resourceMissing } from './errors'
import { formatAmount, isKnownCurrency, MAXIMUM_AMOUNT, minimumCharge } from './money'
import { declineError, type EventPayload, newCharge, newCheckoutSession, newPaymentIntent } from './objects'
import type { ParamReader } from './params'
import { type Account, type AccountStore, type LineItemRecord, randomId, type RequestInfo, type SessionRecord } from './state'

/** What the Checkout logic needs from the server around it. */
export interface FakeDeps {
  store: AccountStore
  emit(account: Account, payload: EventPayload, request: RequestInfo): void
  merchantName(record: SessionRecord): string
}

/** Events caused by the customer or by the clock carry an empty request, as Stripe's automatic events do. */
const NO_REQUEST: RequestInfo = { id: null, idempotencyKey: null }

const ONE_DAY = 24 * 60 * 60
const HALF_HOUR = 30 * 60

function isHttpUrl(value: string): boolean {
  try {
    const url = new URL(value)
    return url.protocol === 'http:' || url.protocol === 'https:'
  } catch {
    return false
  }
}

function checkUrl(params: ParamReader, key: string, value: string): string {
  if (!isHttpUrl(value)) throw parameterInvalid(params.name(key), 'Not a valid URL', 'url_invalid')
  return value
}

/** What the fake can expand (Stripe can expand more, e.g. line_items and customer). */
export const SESSION_EXPANDABLE = ['payment_intent', 'payment_intent.latest_charge']
export const INTENT_EXPANDABLE = ['latest_charge']

export function checkExpand(expand: string[], allowed: string[]): void {
  for (const path of expand) if (!allowed.includes(path)) throw notExpandable(path)
}

export function expandSession(account: Account, session: Stripe.Checkout.Session, expand: string[]): Stripe.Checkout.Session {
  checkExpand(expand, SESSION_EXPANDABLE)
  const out = structuredClone(session)
  if (expand.length > 0 && typeof out.payment_intent === 'string') {
    const intent = account.paymentIntents.get(out.payment_intent)
    const nested = expand.filter((p) => p.startsWith('payment_intent.')).map((p) => p.slice('payment_intent.'.length))
    if (intent) out.payment_intent = expandPaymentIntent(account, intent, nested)
  }
  return out
}

export function expandPaymentIntent(account: Account, intent: Stripe.PaymentIntent, expand: string[]): Stripe.PaymentIntent {
  checkExpand(expand, INTENT_EXPANDABLE)
  const out = structuredClone(intent)
  if (expand.includes('latest_charge') && typeof out.latest_charge === 'string') {
    const charge = account.charges.get(out.latest_charge)
    if (charge) out.latest_charge = structuredClone(charge)
  }
  return out
}

export function notExpandable(path: string) {
  return parameterInvalid(
    'expand',
    `This property cannot be expanded (${path}). (The payments fake expands only the fields listed in docker-free-dev/README.md.)`,
  )
}

function readLineItem(item: ParamReader): { currency: string; line: LineItemRecord } {
  if (item.has('price')) {
    throw parameterInvalid(item.name('price'), 'The payments fake keeps no Price objects: give the amount inline with price_data.')
  }
  const priceData = item.optionalObject('price_data')
  if (!priceData) throw parameterMissing(item.name('price_data'))
  const currency = priceData.requiredString('currency').toLowerCase()
  if (!isKnownCurrency(currency)) throw parameterInvalid(priceData.name('currency'), `Invalid currency: ${currency}.`)
  if (priceData.has('product'))
    throw parameterInvalid(priceData.name('product'), 'The payments fake keeps no Product objects: use product_data.')
  if (priceData.has('recurring')) {
    throw parameterInvalid(
      priceData.name('recurring'),
      'You specified `payment` mode but passed a recurring price. Either switch to `subscription` mode or use only one-time prices.',
    )
  }
  const productData = priceData.optionalObject('product_data')
  if (!productData) throw parameterMissing(priceData.name('product_data'))
  const name = productData.requiredString('name', { maxLength: 5000 })
  const description = productData.optionalString('description', { maxLength: 40000 }) ?? null
  productData.metadata('metadata')
  productData.done()
  const unitAmount = priceData.requiredInteger('unit_amount', { min: 0, max: MAXIMUM_AMOUNT })
  priceData.optionalEnum('tax_behavior', ['inclusive', 'exclusive', 'unspecified'] as const)
  priceData.done()
  const quantity = item.requiredInteger('quantity', { min: 1 })
  item.metadata('metadata')
  item.done()
  return { currency, line: { name, description, unitAmount, quantity } }
}

/** Checkout's page languages, from Stripe.Checkout.SessionCreateParams.Locale in the pinned SDK. */
const LOCALES = [
  'auto',
  'bg',
  'cs',
  'da',
  'de',
  'el',
  'en',
  'en-GB',
  'es',
  'es-419',
  'et',
  'fi',
  'fil',
  'fr',
  'fr-CA',
  'hi-IN',
  'hr',
  'hu',
  'id',
  'it',
  'ja',
  'ko',
  'lt',
  'lv',
  'ms',
  'mt',
  'nb',
  'nl',
  'pl',
  'pt',
  'pt-BR',
  'ro',
  'ru',
  'sk',
  'sl',
  'sv',
  'th',
  'tr',
  'vi',
  'zh',
  'zh-HK',
  'zh-TW',
] as const

/**
 * POST /v1/checkout/sessions, for the subset the product uses: hosted, mode=payment, inline
 * price_data line items (Checkout Sessions API, https://docs.stripe.com/api/checkout/sessions/create).
 * Like Stripe since API version 2022-08-01, no PaymentIntent exists until the customer pays.
 */
export function createCheckoutSession(
  deps: FakeDeps,
  account: Account,
  params: ParamReader,
  pageBaseUrl: string,
): { session: Stripe.Checkout.Session; expand: string[] } {
  const mode = params.optionalString('mode') ?? 'payment'
  if (mode !== 'payment') {
    throw parameterInvalid('mode', `The payments fake supports only mode=payment (got ${mode}).`)
  }
  const uiMode = params.optionalString('ui_mode')
  if (uiMode !== undefined && uiMode !== 'hosted_page') {
    throw parameterInvalid('ui_mode', `The payments fake serves only the hosted payment page (ui_mode=hosted_page), not ${uiMode}.`)
  }
  const successUrl = checkUrl(params, 'success_url', params.requiredString('success_url', { maxLength: 5000 }))
  const cancelInput = params.optionalString('cancel_url', { maxLength: 5000 })
  const cancelUrl = cancelInput === undefined ? null : checkUrl(params, 'cancel_url', cancelInput)
  const clientReferenceId = params.optionalString('client_reference_id', { maxLength: 200 }) ?? null
  const customerEmail = params.optionalString('customer_email', { maxLength: 800 }) ?? null
  if (customerEmail !== null && !/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(customerEmail)) {
    throw parameterInvalid('customer_email', `Invalid email address: ${customerEmail}`, 'email_invalid')
  }
  const metadata = params.metadata('metadata') ?? {}
  const now = account.now()
  const expiresAt = params.optionalInteger('expires_at') ?? now + ONE_DAY
  if (expiresAt < now + HALF_HOUR) {
    throw parameterInvalid('expires_at', 'The `expires_at` timestamp must be at least 30 minutes from Checkout Session creation.')
  }
  if (expiresAt > now + ONE_DAY) {
    throw parameterInvalid('expires_at', 'The `expires_at` timestamp must be less than 24 hours from Checkout Session creation.')
  }
  const submitType = params.optionalEnum('submit_type', ['auto', 'book', 'donate', 'pay'] as const) ?? null
  const locale = params.optionalEnum('locale', LOCALES) ?? null
  const methodTypes = params.stringArray('payment_method_types')
  if (methodTypes && (methodTypes.length !== 1 || methodTypes[0] !== 'card')) {
    throw parameterInvalid('payment_method_types', 'The payments fake takes cards only: payment_method_types must be [card] or left out.')
  }

  const intentData = params.optionalObject('payment_intent_data')
  const paymentIntentData = {
    description: intentData?.optionalString('description', { maxLength: 1000 }) ?? null,
    metadata: intentData?.metadata('metadata') ?? {},
    receiptEmail: intentData?.optionalString('receipt_email') ?? null,
  }
  intentData?.done()

  const items = (params.objectArray('line_items') ?? []).map(readLineItem)
  const first = items[0]
  if (!first) throw parameterMissing('line_items')
  if (items.length > 100) throw parameterInvalid('line_items', 'A Checkout Session in payment mode can have at most 100 line items.')
  const mixed = items.findIndex((item) => item.currency !== first.currency)
  if (mixed >= 0) throw parameterInvalid(`line_items[${mixed}][price_data][currency]`, 'All line_items must use the same currency.')
  const lineItems = items.map((item) => item.line)
  const expand = params.stringArray('expand') ?? []
  params.done()
  checkExpand(expand, SESSION_EXPANDABLE)

  const sessionCurrency = first.currency
  const amountTotal = lineItems.reduce((sum, item) => sum + item.unitAmount * item.quantity, 0)
  if (amountTotal > MAXIMUM_AMOUNT) {
    throw parameterInvalid(
      'line_items',
      `The total amount must be at most ${formatAmount(MAXIMUM_AMOUNT, sessionCurrency, 'en-US')}.`,
      'amount_too_large',
    )
  }
  const minimum = minimumCharge(sessionCurrency) ?? 1
  if (amountTotal < minimum) {
    throw parameterInvalid(
      'line_items',
      `The Checkout Session's total amount due must add up to at least ${formatAmount(minimum, sessionCurrency, 'en-US')} ${sessionCurrency}`,
      'amount_too_small',
    )
  }

  const id = randomId('cs_test_a1', 56)
  const session = newCheckoutSession({
    id,
    created: now,
    expiresAt,
    url: `${pageBaseUrl}/c/pay/${id}`,
    currency: sessionCurrency,
    amountTotal,
    successUrl,
    cancelUrl,
    clientReferenceId,
    customerEmail,
    metadata,
    submitType,
    locale,
  })
  deps.store.addSession(account, { session, total: { amount: amountTotal, currency: sessionCurrency }, lineItems, paymentIntentData })
  return { session, expand }
}

export function getSession(account: Account, id: string): SessionRecord {
  const record = account.sessions.get(id)
  if (!record) throw resourceMissing('checkout.session', id, 'session')
  return record
}

/**
 * Expiring a session closes its payment page; the PaymentIntent of an unpaid attempt is
 * cancelled with it (our reading of "Expire a Checkout Session",
 * https://docs.stripe.com/api/checkout/sessions/expire).
 */
export function expireSession(deps: FakeDeps, account: Account, record: SessionRecord, request: RequestInfo): void {
  const { session } = record
  session.status = 'expired'
  session.url = null
  delete record.pendingAuthentication
  if (typeof session.payment_intent === 'string') {
    const intent = account.paymentIntents.get(session.payment_intent)
    if (intent && intent.status !== 'succeeded') {
      intent.status = 'canceled'
      intent.canceled_at = account.now()
      intent.cancellation_reason = 'abandoned'
      intent.next_action = null
    }
  }
  deps.emit(account, { type: 'checkout.session.expired', object: session }, request)
}

export function expireSessionByApi(deps: FakeDeps, account: Account, id: string, request: RequestInfo): Stripe.Checkout.Session {
  const record = getSession(account, id)
  if (record.session.status !== 'open') {
    throw invalidRequest(
      `Only Checkout Sessions with a status in ["open"] can be expired. This Checkout Session has a status of \`${record.session.status}\`.`,
    )
  }
  expireSession(deps, account, record, request)
  return record.session
}

/** Sessions past expires_at expire on their own, as Stripe's do; run on every access and on a timer. */
export function expireDueSessions(deps: FakeDeps, account: Account): void {
  const now = account.now()
  for (const record of account.sessions.values()) {
    if (record.session.status === 'open' && record.session.expires_at <= now) expireSession(deps, account, record, NO_REQUEST)
  }
}

export type PaymentOutcome =
  | { kind: 'succeeded' }
  | { kind: 'declined'; message: string }
  | { kind: 'authentication_required'; challengeId: string }
  | { kind: 'not_open' }

function intentFor(account: Account, record: SessionRecord): Stripe.PaymentIntent {
  const { session } = record
  if (typeof session.payment_intent === 'string') {
    const existing = account.paymentIntents.get(session.payment_intent)
    if (existing) return existing
  }
  const intent = newPaymentIntent({
    created: account.now(),
    amount: record.total.amount,
    currency: record.total.currency,
    description: record.paymentIntentData.description,
    metadata: record.paymentIntentData.metadata,
    receiptEmail: record.paymentIntentData.receiptEmail,
  })
  account.paymentIntents.set(intent.id, intent)
  session.payment_intent = intent.id
  return intent
}

function statementDescriptor(merchant: string): string {
  return (
    merchant
      .replace(/[<>\\'"*]/g, '')
      .toUpperCase()
      .slice(0, 22)
      .trim() || 'TEST MERCHANT'
  )
}

function settle(
  deps: FakeDeps,
  account: Account,
  record: SessionRecord,
  attempt: {
    intent: Stripe.PaymentIntent
    card: TestCard
    input: CardInput
    email: string | null
    authenticated: boolean
    decline: CardDecline | null
  },
): PaymentOutcome {
  const { intent, decline } = attempt
  const paymentMethodId = randomId('pm_')
  const charge = newCharge({
    created: account.now(),
    intent,
    paymentMethodId,
    card: attempt.card,
    cardInput: attempt.input,
    email: attempt.email,
    authenticated: attempt.authenticated,
    statementDescriptor: statementDescriptor(deps.merchantName(record)),
    decline,
  })
  account.charges.set(charge.id, charge)
  intent.latest_charge = charge.id
  intent.next_action = null
  if (decline) {
    intent.status = 'requires_payment_method'
    intent.payment_method = null
    intent.last_payment_error = declineError(decline, charge.id)
    deps.emit(account, { type: 'payment_intent.payment_failed', object: intent }, NO_REQUEST)
    return { kind: 'declined', message: decline.message }
  }
  intent.status = 'succeeded'
  intent.payment_method = paymentMethodId
  intent.amount_received = intent.amount
  intent.last_payment_error = null
  const { session } = record
  session.status = 'complete'
  session.payment_status = 'paid'
  session.url = null
  session.customer_details = {
    address: null,
    business_name: null,
    email: attempt.email,
    individual_name: null,
    name: null,
    phone: null,
    tax_exempt: 'none',
    tax_ids: [],
  }
  deps.emit(account, { type: 'payment_intent.succeeded', object: intent }, NO_REQUEST)
  deps.emit(account, { type: 'checkout.session.completed', object: session }, NO_REQUEST)
  return { kind: 'succeeded' }
}

/** The customer submits a well-formed card on the payment page; the test card decides what happens. */
export function submitPayment(
  deps: FakeDeps,
  account: Account,
  record: SessionRecord,
  input: CardInput,
  email: string | null,
): PaymentOutcome {
  if (record.session.status !== 'open') return { kind: 'not_open' }
  delete record.pendingAuthentication
  const intent = intentFor(account, record)
  const card = testCardFor(input.number)
  if (!card) {
    intent.status = 'requires_payment_method'
    intent.last_payment_error = declineError(LIVE_CARD_IN_TEST_MODE, undefined)
    deps.emit(account, { type: 'payment_intent.payment_failed', object: intent }, NO_REQUEST)
    return { kind: 'declined', message: LIVE_CARD_IN_TEST_MODE.message }
  }
  const behaviour: CardBehaviour = card.behaviour
  if (behaviour.kind === 'authenticate') {
    intent.status = 'requires_action'
    intent.next_action = { type: 'use_stripe_sdk', use_stripe_sdk: { type: 'three_d_secure_redirect' } }
    const challengeId = randomId('payatt_')
    record.pendingAuthentication = { id: challengeId, paymentIntentId: intent.id, card, input, email }
    return { kind: 'authentication_required', challengeId }
  }
  return settle(deps, account, record, {
    intent,
    card,
    input,
    email,
    authenticated: false,
    decline: behaviour.kind === 'decline' ? behaviour.decline : null,
  })
}

/** The answer to a 3D Secure challenge (the test page's "Complete" or "Fail" button). */
export function answerAuthentication(
  deps: FakeDeps,
  account: Account,
  record: SessionRecord,
  challengeId: string,
  passed: boolean,
): PaymentOutcome | { kind: 'no_challenge' } {
  if (record.session.status !== 'open') return { kind: 'not_open' }
  const pending = record.pendingAuthentication
  if (!pending || pending.id !== challengeId) return { kind: 'no_challenge' }
  delete record.pendingAuthentication
  const intent = account.paymentIntents.get(pending.paymentIntentId)
  if (!intent) return { kind: 'no_challenge' }
  if (!passed) {
    intent.status = 'requires_payment_method'
    intent.next_action = null
    intent.payment_method = null
    intent.last_payment_error = {
      type: 'invalid_request_error',
      code: 'payment_intent_authentication_failure',
      doc_url: 'https://stripe.com/docs/error-codes/payment-intent-authentication-failure',
      message: AUTHENTICATION_FAILED_MESSAGE,
      payment_method_type: 'card',
    }
    deps.emit(account, { type: 'payment_intent.payment_failed', object: intent }, NO_REQUEST)
    return {
      kind: 'declined',
      message: 'We are unable to authenticate your payment method. Please choose a different payment method and try again.',
    }
  }
  const after = pending.card.behaviour.kind === 'authenticate' ? pending.card.behaviour.afterAuthentication : { kind: 'succeed' as const }
  return settle(deps, account, record, {
    intent,
    card: pending.card,
    input: pending.input,
    email: pending.email,
    authenticated: true,
    decline: after.kind === 'decline' ? after.decline : null,
  })
}
