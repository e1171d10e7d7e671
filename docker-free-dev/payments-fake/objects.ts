import type Stripe from 'stripe'
import type { CardDecline, CardInput, TestCard } from './cards'
import { randomId } from './state'

/**
 * Builders for the objects the fake returns, each typed with the `stripe` package's own
 * type so that a field Stripe adds, renames or makes required fails the type-check here.
 * Field meanings and defaults follow the object descriptions in Stripe's API reference
 * (https://docs.stripe.com/api/checkout/sessions/object, /api/payment_intents/object,
 * /api/charges/object, /api/refunds/object, /api/events/object), from memory of those pages
 * where the type alone does not say which value Stripe puts in.
 */

export function newCheckoutSession(input: {
  id: string
  created: number
  expiresAt: number
  url: string
  currency: string
  amountTotal: number
  successUrl: string
  cancelUrl: string | null
  clientReferenceId: string | null
  customerEmail: string | null
  metadata: Record<string, string>
  submitType: Stripe.Checkout.Session.SubmitType | null
  locale: Stripe.Checkout.Session.Locale | null
}): Stripe.Checkout.Session {
  return {
    id: input.id,
    object: 'checkout.session',
    adaptive_pricing: { enabled: false },
    after_expiration: null,
    allow_promotion_codes: null,
    allowed_payment_method_types: null,
    amount_subtotal: input.amountTotal,
    amount_total: input.amountTotal,
    automatic_tax: { enabled: false, liability: null, provider: null, status: null },
    billing_address_collection: null,
    cancel_url: input.cancelUrl,
    client_reference_id: input.clientReferenceId,
    client_secret: null,
    collected_information: null,
    consent: null,
    consent_collection: null,
    created: input.created,
    currency: input.currency,
    currency_conversion: null,
    custom_fields: [],
    custom_text: { after_submit: null, shipping_address: null, submit: null, terms_of_service_acceptance: null },
    customer: null,
    customer_account: null,
    customer_creation: 'if_required',
    customer_details: null,
    customer_email: input.customerEmail,
    discounts: [],
    expires_at: input.expiresAt,
    integration_identifier: null,
    invoice: null,
    invoice_creation: {
      enabled: false,
      invoice_data: {
        account_tax_ids: null,
        custom_fields: null,
        description: null,
        footer: null,
        issuer: null,
        metadata: {},
        rendering_options: null,
      },
    },
    livemode: false,
    locale: input.locale,
    managed_payments: null,
    metadata: input.metadata,
    mode: 'payment',
    origin_context: null,
    payment_intent: null,
    payment_link: null,
    payment_method_collection: 'if_required',
    payment_method_configuration_details: null,
    payment_method_options: { card: { request_three_d_secure: 'automatic' } },
    payment_method_types: ['card'],
    payment_status: 'unpaid',
    permissions: null,
    recovered_from: null,
    saved_payment_method_options: null,
    setup_intent: null,
    shipping_address_collection: null,
    shipping_cost: null,
    shipping_options: [],
    status: 'open',
    submit_type: input.submitType,
    subscription: null,
    success_url: input.successUrl,
    total_details: { amount_discount: 0, amount_shipping: 0, amount_tax: 0 },
    ui_mode: 'hosted_page',
    url: input.url,
    wallet_options: null,
  }
}

export function newPaymentIntent(input: {
  created: number
  amount: number
  currency: string
  description: string | null
  metadata: Record<string, string>
  receiptEmail: string | null
}): Stripe.PaymentIntent {
  const id = randomId('pi_')
  return {
    id,
    object: 'payment_intent',
    allowed_payment_method_types: null,
    amount: input.amount,
    amount_capturable: 0,
    amount_details: { tip: {} },
    amount_received: 0,
    application: null,
    application_fee_amount: null,
    automatic_payment_methods: null,
    canceled_at: null,
    cancellation_reason: null,
    capture_method: 'automatic_async',
    client_secret: `${id}_secret_${randomId('', 25)}`,
    confirmation_method: 'automatic',
    created: input.created,
    currency: input.currency,
    customer: null,
    customer_account: null,
    description: input.description,
    excluded_payment_method_types: null,
    last_payment_error: null,
    latest_charge: null,
    livemode: false,
    managed_payments: null,
    metadata: input.metadata,
    next_action: null,
    on_behalf_of: null,
    payment_method: null,
    payment_method_configuration_details: null,
    payment_method_options: {
      card: { installments: null, mandate_options: null, network: null, request_three_d_secure: 'automatic' },
    },
    payment_method_types: ['card'],
    payment_record: null,
    processing: null,
    receipt_email: input.receiptEmail,
    review: null,
    setup_future_usage: null,
    shipping: null,
    source: null,
    statement_descriptor: null,
    statement_descriptor_suffix: null,
    status: 'requires_payment_method',
    transfer_data: null,
    transfer_group: null,
  }
}

function cardDetails(
  card: TestCard,
  input: CardInput,
  amountAuthorized: number | null,
  authenticated: boolean,
): Stripe.Charge.PaymentMethodDetails {
  return {
    type: 'card',
    card: {
      amount_authorized: amountAuthorized,
      authorization_code: amountAuthorized === null ? null : randomId('', 6),
      brand: card.brand,
      checks: { address_line1_check: null, address_postal_code_check: null, cvc_check: 'pass' },
      country: card.country,
      electronic_commerce_indicator: null,
      exp_month: input.expMonth,
      exp_year: input.expYear,
      fingerprint: `fp${card.number.slice(-4)}${card.brand}`,
      funding: card.funding,
      installments: null,
      last4: card.number.slice(-4),
      mandate: null,
      network: card.brand,
      network_transaction_id: amountAuthorized === null ? null : randomId('', 15),
      regulated_status: 'unregulated',
      three_d_secure: authenticated
        ? {
            authentication_flow: 'challenge',
            electronic_commerce_indicator: '05',
            exemption_indicator: null,
            result: 'authenticated',
            result_reason: null,
            transaction_id: randomId('', 32),
            version: '2.2.0',
          }
        : null,
      transaction_link_id: null,
      wallet: null,
    },
  }
}

export function newCharge(input: {
  created: number
  intent: Stripe.PaymentIntent
  paymentMethodId: string
  card: TestCard
  cardInput: CardInput
  email: string | null
  authenticated: boolean
  statementDescriptor: string
  decline: CardDecline | null
}): Stripe.Charge {
  const { intent, decline } = input
  const succeeded = decline === null
  return {
    id: randomId('ch_'),
    object: 'charge',
    amount: intent.amount,
    amount_captured: succeeded ? intent.amount : 0,
    amount_refunded: 0,
    application: null,
    application_fee: null,
    application_fee_amount: null,
    balance_transaction: succeeded ? randomId('txn_') : null,
    billing_details: { address: null, email: input.email, name: null, phone: null, tax_id: null },
    calculated_statement_descriptor: input.statementDescriptor,
    captured: succeeded,
    created: input.created,
    currency: intent.currency,
    customer: null,
    description: intent.description,
    disputed: false,
    failure_balance_transaction: null,
    failure_code: decline?.code ?? null,
    failure_message: decline?.message ?? null,
    fraud_details: {},
    livemode: false,
    metadata: { ...intent.metadata },
    on_behalf_of: null,
    outcome: succeeded
      ? {
          advice_code: null,
          network_advice_code: null,
          network_decline_code: null,
          network_status: 'approved_by_network',
          reason: null,
          risk_level: 'normal',
          risk_score: 20,
          seller_message: 'Payment complete.',
          type: 'authorized',
        }
      : {
          advice_code: null,
          network_advice_code: null,
          network_decline_code: null,
          network_status: 'declined_by_network',
          reason: decline.declineCode ?? decline.code,
          risk_level: 'normal',
          risk_score: 20,
          seller_message: 'The bank did not return any further details with this decline.',
          type: 'issuer_declined',
        },
    paid: succeeded,
    payment_intent: intent.id,
    payment_method: input.paymentMethodId,
    payment_method_details: cardDetails(input.card, input.cardInput, succeeded ? intent.amount : null, input.authenticated),
    receipt_email: intent.receipt_email,
    receipt_number: null,
    receipt_url: null,
    refunded: false,
    review: null,
    shipping: null,
    source: null,
    source_transfer: null,
    statement_descriptor: null,
    statement_descriptor_suffix: null,
    status: succeeded ? 'succeeded' : 'failed',
    transfer_data: null,
    transfer_group: null,
  }
}

export function newRefund(input: {
  created: number
  amount: number
  charge: Stripe.Charge
  metadata: Record<string, string>
  reason: Stripe.Refund.Reason | null
}): Stripe.Refund {
  return {
    id: randomId('re_'),
    object: 'refund',
    amount: input.amount,
    balance_transaction: randomId('txn_'),
    charge: input.charge.id,
    created: input.created,
    currency: input.charge.currency,
    customer: null,
    customer_account: null,
    destination_details: {
      type: 'card',
      card: { reference_status: 'pending', reference_type: 'acquirer_reference_number', type: 'refund' },
    },
    metadata: input.metadata,
    payment_intent:
      typeof input.charge.payment_intent === 'string' ? input.charge.payment_intent : (input.charge.payment_intent?.id ?? null),
    payment_method: input.charge.payment_method,
    reason: input.reason,
    receipt_number: null,
    source_transfer_reversal: null,
    status: 'succeeded',
    transfer_reversal: null,
  }
}

/** The last_payment_error Stripe puts on a PaymentIntent after a declined attempt (same shape as the card error it answers). */
export function declineError(decline: CardDecline, chargeId: string | undefined): Stripe.PaymentIntent.LastPaymentError {
  return {
    type: 'card_error',
    code: decline.code,
    ...(decline.declineCode ? { decline_code: decline.declineCode } : {}),
    doc_url: `https://stripe.com/docs/error-codes/${decline.code.replaceAll('_', '-')}`,
    message: decline.message,
    ...(chargeId ? { charge: chargeId } : {}),
    payment_method_type: 'card',
  }
}

export type FakeEvent =
  | Stripe.CheckoutSessionCompletedEvent
  | Stripe.CheckoutSessionExpiredEvent
  | Stripe.PaymentIntentSucceededEvent
  | Stripe.PaymentIntentPaymentFailedEvent
  | Stripe.ChargeRefundedEvent
  | Stripe.RefundCreatedEvent

export type EventPayload =
  | { type: 'checkout.session.completed'; object: Stripe.Checkout.Session }
  | { type: 'checkout.session.expired'; object: Stripe.Checkout.Session }
  | { type: 'payment_intent.succeeded'; object: Stripe.PaymentIntent }
  | { type: 'payment_intent.payment_failed'; object: Stripe.PaymentIntent }
  | { type: 'charge.refunded'; object: Stripe.Charge; previous: Partial<Stripe.Charge> }
  | { type: 'refund.created'; object: Stripe.Refund }

/** Events carry a snapshot of the object as it was when the event happened, as Stripe's do. */
export function newEvent(
  payload: EventPayload,
  base: { created: number; apiVersion: string; pendingWebhooks: number; request: Stripe.Event.Request },
): FakeEvent {
  const common = {
    id: randomId('evt_'),
    object: 'event' as const,
    api_version: base.apiVersion,
    created: base.created,
    livemode: false,
    pending_webhooks: base.pendingWebhooks,
    request: base.request,
  }
  switch (payload.type) {
    case 'checkout.session.completed':
      return { ...common, type: payload.type, data: { object: structuredClone(payload.object) } }
    case 'checkout.session.expired':
      return { ...common, type: payload.type, data: { object: structuredClone(payload.object) } }
    case 'payment_intent.succeeded':
      return { ...common, type: payload.type, data: { object: structuredClone(payload.object) } }
    case 'payment_intent.payment_failed':
      return { ...common, type: payload.type, data: { object: structuredClone(payload.object) } }
    case 'charge.refunded':
      return { ...common, type: payload.type, data: { object: structuredClone(payload.object), previous_attributes: payload.previous } }
    case 'refund.created':
      return { ...common, type: payload.type, data: { object: structuredClone(payload.object) } }
  }
}
