import Stripe from 'stripe'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { signWebhookPayload } from '../../docker-free-dev/payments-fake/signature'
import {
  depositParams,
  freshKey,
  pointWebhooksAt,
  type Receiver,
  type ReceivedWebhook,
  sessionUrlOf,
  startReceiver,
  stripeFor,
  submitCard,
  WEBHOOK_SECRET,
} from './payments-fake-helpers'

/**
 * The fake's webhooks must pass the official SDK's verification unchanged. Source for the
 * scheme and the 300 s default tolerance: "Check the webhook signatures",
 * https://docs.stripe.com/webhooks#verify-events, and stripe-node's Webhooks (DEFAULT_TOLERANCE).
 */
describe('payments fake webhook signatures', () => {
  let receiver: Receiver
  let delivery: ReceivedWebhook

  beforeEach(async () => {
    const key = freshKey()
    receiver = await startReceiver()
    await pointWebhooksAt(key, receiver)
    const stripe = stripeFor(key)
    const session = await stripe.checkout.sessions.create(depositParams())
    expect((await submitCard(sessionUrlOf(session), { number: '4242 4242 4242 4242' })).status).toBe(303)
    await vi.waitFor(() => expect(receiver.events().map((e) => e.type)).toContain('checkout.session.completed'))
    const found = receiver.received.find((r) => r.body.includes('"checkout.session.completed"'))
    if (!found) throw new Error('no checkout.session.completed delivery')
    delivery = found
  })

  afterEach(async () => {
    await receiver.close()
  })

  it('is accepted by stripe.webhooks.constructEvent with the endpoint secret', () => {
    const event = Stripe.webhooks.constructEvent(delivery.body, delivery.signature, WEBHOOK_SECRET)
    expect(event.type).toBe('checkout.session.completed')
    expect(event.object).toBe('event')
    // Stripe posts JSON (https://docs.stripe.com/webhooks#receive-events).
    expect(delivery.contentType).toMatch(/^application\/json/)
    // Header shape from https://docs.stripe.com/webhooks#verify-manually: t=<seconds>,v1=<64 hex digits>.
    expect(delivery.signature).toMatch(/^t=\d{10},v1=[0-9a-f]{64}$/)
  })

  it('is refused when one byte of the body changed', () => {
    const tampered = delivery.body.replace('"amount_total": 12345', '"amount_total": 12346')
    expect(tampered).not.toBe(delivery.body)
    expect(() => Stripe.webhooks.constructEvent(tampered, delivery.signature, WEBHOOK_SECRET)).toThrow(
      Stripe.errors.StripeSignatureVerificationError,
    )
  })

  it('is refused with another secret', () => {
    expect(() => Stripe.webhooks.constructEvent(delivery.body, delivery.signature, 'whsec_someone_else')).toThrow(
      Stripe.errors.StripeSignatureVerificationError,
    )
  })

  it('is refused when signed more than the 300 s tolerance ago, and accepted just inside it', () => {
    const now = Math.floor(Date.now() / 1000)
    const stale = signWebhookPayload(delivery.body, WEBHOOK_SECRET, now - 301)
    expect(() => Stripe.webhooks.constructEvent(delivery.body, stale, WEBHOOK_SECRET)).toThrow(/tolerance/i)
    const recent = signWebhookPayload(delivery.body, WEBHOOK_SECRET, now - 250)
    expect(Stripe.webhooks.constructEvent(delivery.body, recent, WEBHOOK_SECRET).type).toBe('checkout.session.completed')
  })

  it('matches the header the SDK itself builds for the same payload, secret and time', () => {
    const timestamp = 1_700_000_000
    const ours = signWebhookPayload(delivery.body, WEBHOOK_SECRET, timestamp)
    const sdk = Stripe.webhooks.generateTestHeaderString({ payload: delivery.body, secret: WEBHOOK_SECRET, timestamp })
    expect(ours).toBe(sdk)
  })
})
