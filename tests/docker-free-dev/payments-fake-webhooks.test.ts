import Stripe from 'stripe'
import { afterEach, describe, expect, it, vi } from 'vitest'
import { createPaymentsFake, type RunningPaymentsFake } from '../../docker-free-dev/payments-fake/server'
import {
  depositParams,
  fakeJson,
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
 * Webhook delivery. Sources: "Receive Stripe events in your webhook endpoint"
 * (https://docs.stripe.com/webhooks): a non-2xx answer is retried with exponential backoff,
 * endpoints can receive the same event more than once ("Handle duplicate events"), and each
 * delivery is signed (https://docs.stripe.com/webhooks#verify-events).
 */
describe('payments fake webhook delivery', () => {
  const cleanup: Array<() => Promise<void>> = []
  afterEach(async () => {
    for (const fn of cleanup.splice(0)) await fn()
  })

  async function receiverWith(statuses: number[] = []): Promise<Receiver> {
    const receiver = await startReceiver(statuses)
    cleanup.push(() => receiver.close())
    return receiver
  }

  async function payDeposit(key: string): Promise<void> {
    const session = await stripeFor(key).checkout.sessions.create(depositParams())
    expect((await submitCard(sessionUrlOf(session), { number: '4242424242424242' })).status).toBe(303)
  }

  it('retries an endpoint that answers 500 twice, and stops after the 200 on the third attempt', async () => {
    const key = freshKey()
    const receiver = await receiverWith([500, 500])
    await pointWebhooksAt(key, receiver, { enabledEvents: ['checkout.session.completed'], maxAttempts: 5, backoffMs: 20 })
    await payDeposit(key)

    await vi.waitFor(() => expect(receiver.received).toHaveLength(3))
    const ids = receiver.events().map((e) => e.id)
    expect(new Set(ids).size).toBe(1)
    for (const r of receiver.received)
      expect(Stripe.webhooks.constructEvent(r.body, r.signature, WEBHOOK_SECRET).type).toBe('checkout.session.completed')
    await vi.waitFor(async () => {
      const deliveries = (await fakeState(key)).webhook_deliveries
      expect(deliveries.map((d) => [d.attempt, d.status, d.succeeded])).toEqual([
        [1, 500, false],
        [2, 500, false],
        [3, 200, true],
      ])
    })
    // Longer than the remaining backoff (20 ms · 2³): a delivered event is not sent again.
    await new Promise((r) => setTimeout(r, 300))
    expect(receiver.received).toHaveLength(3)
    const [event] = (await fakeState(key)).events
    expect(event?.pending_webhooks).toBe(0)
  })

  it('gives up after the configured number of attempts', async () => {
    const key = freshKey()
    const receiver = await receiverWith([503, 503, 503, 503, 503])
    await pointWebhooksAt(key, receiver, { enabledEvents: ['payment_intent.succeeded'], maxAttempts: 2, backoffMs: 10 })
    await payDeposit(key)
    await vi.waitFor(() => expect(receiver.received).toHaveLength(2))
    await new Promise((r) => setTimeout(r, 300))
    expect(receiver.received).toHaveLength(2)
    expect((await fakeState(key)).events.find((e) => e.type === 'payment_intent.succeeded')?.pending_webhooks).toBe(1)
  })

  it('re-sends an event on request, so duplicate delivery can be exercised', async () => {
    const key = freshKey()
    const receiver = await receiverWith()
    await pointWebhooksAt(key, receiver, { enabledEvents: ['checkout.session.completed'] })
    await payDeposit(key)
    await vi.waitFor(() => expect(receiver.received).toHaveLength(1))
    const [first] = receiver.events()
    if (!first) throw new Error('no first delivery')

    const { status } = await fakeJson(key, 'POST', `/_fake/events/${first.id}/resend`)
    expect(status).toBe(202)
    await vi.waitFor(() => expect(receiver.received).toHaveLength(2))
    const second = receiver.received[1]
    if (!second) throw new Error('no second delivery')
    const duplicate = Stripe.webhooks.constructEvent(second.body, second.signature, WEBHOOK_SECRET)
    expect(duplicate.id).toBe(first.id)
    expect((await fakeState(key)).webhook_deliveries.map((d) => d.redelivery)).toEqual([false, true])
  })

  it('sends only to the endpoint of the key that caused the event', async () => {
    const keyA = freshKey()
    const keyB = freshKey()
    const receiverA = await receiverWith()
    const receiverB = await receiverWith()
    await pointWebhooksAt(keyA, receiverA)
    await pointWebhooksAt(keyB, receiverB)
    await payDeposit(keyA)
    await vi.waitFor(() => expect(receiverA.events().map((e) => e.type)).toContain('checkout.session.completed'))
    expect(receiverB.received).toHaveLength(0)
  })

  it('uses the endpoint given when the fake is created for every key, and listens on 127.0.0.1 only', async () => {
    const receiver = await receiverWith([500])
    const fake = createPaymentsFake({
      webhookUrl: receiver.url,
      webhookSecret: WEBHOOK_SECRET,
      webhookBackoffMs: 10,
      merchantName: 'Ridgeway Axles',
    })
    const running: RunningPaymentsFake = await fake.listen(0)
    cleanup.push(() => running.close())
    expect(running.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+$/)

    const key = freshKey()
    const stripe = stripeFor(key, running.url)
    const session = await stripe.checkout.sessions.create(depositParams())
    expect(session.url?.startsWith(`${running.url}/c/pay/`)).toBe(true)
    expect(await (await fetch(sessionUrlOf(session))).text()).toContain('Ridgeway Axles')
    expect((await submitCard(sessionUrlOf(session), { number: '4242424242424242' })).status).toBe(303)
    await vi.waitFor(() =>
      expect(receiver.received.map((r) => Stripe.webhooks.constructEvent(r.body, r.signature, WEBHOOK_SECRET).type)).toEqual(
        expect.arrayContaining(['payment_intent.succeeded', 'checkout.session.completed']),
      ),
    )
    // The first answer was a 500, so one event arrived twice.
    expect(receiver.received.length).toBe(3)
    expect((await fakeState(key, running.url)).checkout_sessions).toHaveLength(1)

    const { status } = await fakeJson(key, 'POST', '/_fake/reset', undefined, running.url)
    expect(status).toBe(200)
    expect((await fakeState(key, running.url)).checkout_sessions).toEqual([])
  })

  it('refuses a webhook endpoint that is not on this machine', async () => {
    const { status } = await fakeJson(freshKey(), 'POST', '/_fake/webhook', {
      url: 'https://hooks.example.com/stripe',
      secret: WEBHOOK_SECRET,
    })
    expect(status).toBe(400)
  })
})
