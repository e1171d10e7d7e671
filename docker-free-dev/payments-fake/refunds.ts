import type Stripe from 'stripe'
import type { FakeDeps } from './checkout'
import { checkExpand } from './checkout'
import { invalidRequest, parameterInvalid, resourceMissing } from './errors'
import { formatAmount } from './money'
import { newRefund } from './objects'
import type { ParamReader } from './params'
import type { Account, RequestInfo } from './state'

const REFUND_EXPANDABLE = ['charge', 'payment_intent']

export function expandRefund(account: Account, refund: Stripe.Refund, expand: string[]): Stripe.Refund {
  checkExpand(expand, REFUND_EXPANDABLE)
  const out = structuredClone(refund)
  if (expand.includes('charge') && typeof out.charge === 'string') {
    const charge = account.charges.get(out.charge)
    if (charge) out.charge = structuredClone(charge)
  }
  if (expand.includes('payment_intent') && typeof out.payment_intent === 'string') {
    const intent = account.paymentIntents.get(out.payment_intent)
    if (intent) out.payment_intent = structuredClone(intent)
  }
  return out
}

function refundableCharge(account: Account, target: { param: 'payment_intent' | 'charge'; id: string }): Stripe.Charge {
  if (target.param === 'payment_intent') {
    const intent = account.paymentIntents.get(target.id)
    if (!intent) throw resourceMissing('payment_intent', target.id, 'payment_intent')
    const charge = typeof intent.latest_charge === 'string' ? account.charges.get(intent.latest_charge) : undefined
    if (intent.status !== 'succeeded' || !charge) {
      throw invalidRequest(`This PaymentIntent (${target.id}) does not have a successful charge to refund.`, {
        param: 'payment_intent',
        code: 'charge_not_refundable',
      })
    }
    return charge
  }
  const charge = account.charges.get(target.id)
  if (!charge) throw resourceMissing('charge', target.id, 'charge')
  if (charge.status !== 'succeeded')
    throw invalidRequest(`Charge ${charge.id} did not succeed, so it cannot be refunded.`, {
      param: 'charge',
      code: 'charge_not_refundable',
    })
  return charge
}

/**
 * POST /v1/refunds against a PaymentIntent or a Charge, full (amount left out) or partial
 * (Refunds API, https://docs.stripe.com/api/refunds/create). Several partial refunds may add
 * up to the charge's amount and no further. Test-mode card refunds succeed at once.
 */
export function createRefund(
  deps: FakeDeps,
  account: Account,
  params: ParamReader,
  request: RequestInfo,
): { refund: Stripe.Refund; expand: string[] } {
  const intentId = params.optionalString('payment_intent')
  const chargeId = params.optionalString('charge')
  const amount = params.optionalInteger('amount', { min: 1 })
  const reason = params.optionalEnum('reason', ['duplicate', 'fraudulent', 'requested_by_customer'] as const) ?? null
  const metadata = params.metadata('metadata') ?? {}
  const expand = params.stringArray('expand') ?? []
  params.done()
  checkExpand(expand, REFUND_EXPANDABLE)
  if (intentId !== undefined && chargeId !== undefined) {
    throw parameterInvalid('charge', 'You may only specify one of these parameters: charge, payment_intent.', 'parameters_exclusive')
  }
  const target =
    intentId !== undefined
      ? { param: 'payment_intent' as const, id: intentId }
      : chargeId !== undefined
        ? { param: 'charge' as const, id: chargeId }
        : undefined
  if (!target) {
    throw parameterInvalid(
      'payment_intent',
      'One of the following params should be provided for this request: payment_intent or charge.',
      'parameter_missing',
    )
  }

  const charge = refundableCharge(account, target)
  const remaining = charge.amount - charge.amount_refunded
  if (remaining === 0) throw invalidRequest(`Charge ${charge.id} has already been refunded.`, { code: 'charge_already_refunded' })
  const refundAmount = amount ?? remaining
  if (refundAmount > remaining) {
    throw invalidRequest(
      `Refund amount (${formatAmount(refundAmount, charge.currency, 'en-US')}) is greater than unrefunded amount on charge (${formatAmount(remaining, charge.currency, 'en-US')})`,
      { param: 'amount' },
    )
  }

  const previous = { amount_refunded: charge.amount_refunded, refunded: charge.refunded }
  const refund = newRefund({ created: account.now(), amount: refundAmount, charge, metadata, reason })
  account.refunds.set(refund.id, refund)
  charge.amount_refunded += refundAmount
  charge.refunded = charge.amount_refunded === charge.amount
  deps.emit(account, { type: 'charge.refunded', object: charge, previous }, request)
  deps.emit(account, { type: 'refund.created', object: refund }, request)
  return { refund, expand }
}
