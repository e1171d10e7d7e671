import Stripe from 'stripe'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import {
  depositParams,
  fakeState,
  freshKey,
  pointWebhooksAt,
  type Receiver,
  sessionUrlOf,
  startReceiver,
  stripeFor,
  submitCard,
  WEBHOOK_SECRET,
} from './payments-fake-helpers'

/**
 * Refunds against a paid deposit. Sources: Refunds API (https://docs.stripe.com/api/refunds/create:
 * amount defaults to the whole remaining amount; "Can refund only up to the remaining,
 * unrefunded amount of the charge"), Refund and cancel payments
 * (https://docs.stripe.com/refunds), event types charge.refunded and refund.created
 * (https://docs.stripe.com/api/events/types).
 */
describe('payments fake refunds', () => {
  let key: string
  let stripe: Stripe
  let receiver: Receiver

  beforeEach(async () => {
    key = freshKey()
    stripe = stripeFor(key)
    receiver = await startReceiver()
    await pointWebhooksAt(key, receiver)
  })

  afterEach(async () => {
    await receiver.close()
  })

  async function paidIntent(): Promise<string> {
    const session = await stripe.checkout.sessions.create(depositParams())
    expect((await submitCard(sessionUrlOf(session), { number: '4242424242424242' })).status).toBe(303)
    const paid = await stripe.checkout.sessions.retrieve(session.id)
    if (typeof paid.payment_intent !== 'string') throw new Error('paid session has no PaymentIntent id')
    return paid.payment_intent
  }

  it('refunds the whole payment when no amount is given and sends charge.refunded and refund.created', async () => {
    const intentId = await paidIntent()
    const refund = await stripe.refunds.create({
      payment_intent: intentId,
      reason: 'requested_by_customer',
      metadata: { estimateId: 'e1' },
    })
    expect(refund).toMatchObject({
      object: 'refund',
      amount: 12345,
      currency: 'gbp',
      status: 'succeeded',
      payment_intent: intentId,
      reason: 'requested_by_customer',
    })
    expect(refund.id).toMatch(/^re_/)
    const retrieved = await stripe.refunds.retrieve(refund.id, { expand: ['charge'] })
    expect(retrieved.metadata).toEqual({ estimateId: 'e1' })
    if (typeof retrieved.charge !== 'object' || retrieved.charge === null) throw new Error('charge was not expanded')
    expect(retrieved.charge).toMatchObject({ amount_refunded: 12345, refunded: true })

    await vi.waitFor(() =>
      expect(receiver.received.map((r) => Stripe.webhooks.constructEvent(r.body, r.signature, WEBHOOK_SECRET).type)).toEqual(
        expect.arrayContaining(['charge.refunded', 'refund.created']),
      ),
    )
    const chargeRefunded = receiver.events().find((e) => e.type === 'charge.refunded')
    if (chargeRefunded?.type !== 'charge.refunded') throw new Error('no charge.refunded')
    expect(chargeRefunded.data.object.amount_refunded).toBe(12345)
    expect(chargeRefunded.data.previous_attributes).toMatchObject({ amount_refunded: 0, refunded: false })
  })

  it('takes partial refunds up to what was paid and refuses one that would go over', async () => {
    const intentId = await paidIntent()
    expect((await stripe.refunds.create({ payment_intent: intentId, amount: 10000 })).amount).toBe(10000)
    // 10000 + 3000 > 12345: refused, and nothing changes.
    await expect(stripe.refunds.create({ payment_intent: intentId, amount: 3000 })).rejects.toMatchObject({
      type: 'StripeInvalidRequestError',
      statusCode: 400,
      param: 'amount',
      message: expect.stringMatching(/greater than unrefunded amount/),
    })
    expect((await fakeState(key)).refunds).toHaveLength(1)
    expect((await stripe.refunds.create({ payment_intent: intentId, amount: 2345 })).amount).toBe(2345)
    const state = await fakeState(key)
    expect(state.charges[0]).toMatchObject({ amount_refunded: 12345, refunded: true })
    await expect(stripe.refunds.create({ payment_intent: intentId, amount: 1 })).rejects.toMatchObject({
      statusCode: 400,
      code: 'charge_already_refunded',
    })
  })

  it('refuses to refund a payment that never succeeded', async () => {
    const session = await stripe.checkout.sessions.create(depositParams())
    await submitCard(sessionUrlOf(session), { number: '4000000000000002' })
    const [intent] = (await fakeState(key)).payment_intents
    if (!intent) throw new Error('no PaymentIntent after a declined attempt')
    await expect(stripe.refunds.create({ payment_intent: intent.id })).rejects.toMatchObject({ statusCode: 400, param: 'payment_intent' })
    await expect(stripe.refunds.create({ payment_intent: 'pi_unknown' })).rejects.toMatchObject({
      statusCode: 404,
      code: 'resource_missing',
    })
    await expect(stripe.refunds.create({})).rejects.toMatchObject({ statusCode: 400 })
  })

  it('creates one refund for a retried request with the same idempotency key', async () => {
    const intentId = await paidIntent()
    const first = await stripe.refunds.create({ payment_intent: intentId, amount: 500 }, { idempotencyKey: 'refund-e1-1' })
    const retry = await stripe.refunds.create({ payment_intent: intentId, amount: 500 }, { idempotencyKey: 'refund-e1-1' })
    expect(retry.id).toBe(first.id)
    expect((await fakeState(key)).refunds).toHaveLength(1)
    await expect(
      stripe.refunds.create({ payment_intent: intentId, amount: 600 }, { idempotencyKey: 'refund-e1-1' }),
    ).rejects.toBeInstanceOf(Stripe.errors.StripeIdempotencyError)
  })

  it('replays a refused refund under the same idempotency key, since the endpoint had begun', async () => {
    // Idempotent requests: results are saved once endpoint execution begins, "including 500 errors" — and so 400s past validation.
    const intentId = await paidIntent()
    const tooMuch = { payment_intent: intentId, amount: 20000 }
    const first = await stripe.refunds.create(tooMuch, { idempotencyKey: 'refund-e1-2' }).catch((e: unknown) => e)
    const second = await stripe.refunds.create(tooMuch, { idempotencyKey: 'refund-e1-2' }).catch((e: unknown) => e)
    expect(first).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)
    expect(second).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)
    if (!(second instanceof Stripe.errors.StripeInvalidRequestError)) throw new Error('narrowing')
    expect(second.headers?.['idempotent-replayed']).toBe('true')
  })
})
