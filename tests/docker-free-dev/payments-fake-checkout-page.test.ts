import Stripe from 'stripe'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import {
  answerChallenge,
  CANCEL_URL,
  depositParams,
  fakeState,
  freshKey,
  pointWebhooksAt,
  type Receiver,
  sessionUrlOf,
  startReceiver,
  stripeFor,
  submitCard,
  SUCCESS_URL,
  WEBHOOK_SECRET,
} from './payments-fake-helpers'

/**
 * The customer's side: the payment page behind a session's url, paid by posting its form as
 * a browser does. Card behaviours follow Stripe's test cards ("Testing",
 * https://docs.stripe.com/testing: 4242… succeeds, 4000…0002 generic_decline, 4000…9995
 * insufficient_funds, 4000 0027 6000 3184 asks for 3D Secure), the resulting objects follow
 * Checkout (https://docs.stripe.com/payments/checkout/fulfill-orders) and PaymentIntents
 * (https://docs.stripe.com/payments/paymentintents/lifecycle).
 */
describe('payments fake payment page', () => {
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

  /** Verified events the receiver got, in order, checked with the SDK like the product's webhook route does. */
  const verifiedTypes = () => receiver.received.map((r) => Stripe.webhooks.constructEvent(r.body, r.signature, WEBHOOK_SECRET).type)

  it('shows a phone-friendly TEST page with the merchant, what is paid for and the amount in the session currency', async () => {
    const session = await stripe.checkout.sessions.create(depositParams({ metadata: { merchant_name: 'Hillside 4x4 Repairs' } }))
    const res = await fetch(sessionUrlOf(session))
    expect(res.status).toBe(200)
    const html = await res.text()
    expect(html).toContain('TEST PAYMENT PAGE')
    expect(html).toContain('Hillside 4x4 Repairs')
    expect(html).toContain('Repair deposit')
    expect(html).toContain('Front axle: swivel housing rebuild, both sides')
    expect(html).toContain(new Intl.NumberFormat('en-GB', { style: 'currency', currency: 'GBP' }).format(123.45))
    expect(html).toContain('name="viewport"')
    for (const id of ['card_number', 'card_expiry', 'card_cvc']) expect(html).toMatch(new RegExp(`<label for="${id}">`))
    expect(html).toContain(`href="${CANCEL_URL}"`)
    // No external assets: no scripts, stylesheets, images or fonts from anywhere.
    expect(html).not.toMatch(/<script|<link|<img|@import|url\(/i)
  })

  it('formats a zero-decimal currency without minor digits', async () => {
    // JPY is zero-decimal: unit_amount 5000 is ¥5,000 (Supported currencies, https://docs.stripe.com/currencies#zero-decimal).
    const session = await stripe.checkout.sessions.create(
      depositParams({
        line_items: [{ quantity: 1, price_data: { currency: 'jpy', unit_amount: 5000, product_data: { name: 'Deposit' } } }],
      }),
    )
    const html = await (await fetch(sessionUrlOf(session))).text()
    expect(html).toContain(new Intl.NumberFormat('en-GB', { style: 'currency', currency: 'JPY' }).format(5000))
  })

  it('takes 4242 4242 4242 4242, redirects to success_url and completes session, PaymentIntent and webhooks', async () => {
    const session = await stripe.checkout.sessions.create(depositParams())
    const answer = await submitCard(sessionUrlOf(session), { number: '4242 4242 4242 4242' })
    expect(answer.status).toBe(303)
    // {CHECKOUT_SESSION_ID} in success_url is replaced with the session id (Checkout, custom success page).
    expect(answer.location).toBe(SUCCESS_URL.replace('{CHECKOUT_SESSION_ID}', session.id))

    const paid = await stripe.checkout.sessions.retrieve(session.id, { expand: ['payment_intent.latest_charge'] })
    expect(paid).toMatchObject({ status: 'complete', payment_status: 'paid', url: null })
    expect(paid.customer_details?.email).toBe('keeper@example.com')
    const intent = paid.payment_intent
    if (typeof intent !== 'object' || intent === null) throw new Error('payment_intent was not expanded')
    expect(intent).toMatchObject({
      status: 'succeeded',
      amount: 12345,
      amount_received: 12345,
      currency: 'gbp',
      metadata: { estimateId: 'e1', version: '2' },
    })
    const charge = intent.latest_charge
    if (typeof charge !== 'object' || charge === null) throw new Error('latest_charge was not expanded')
    expect(charge).toMatchObject({ status: 'succeeded', paid: true, amount: 12345, payment_intent: intent.id })
    expect(charge.payment_method_details?.card).toMatchObject({ brand: 'visa', last4: '4242' })
    expect((await stripe.paymentIntents.retrieve(intent.id)).status).toBe('succeeded')

    await vi.waitFor(() =>
      expect(verifiedTypes()).toEqual(expect.arrayContaining(['payment_intent.succeeded', 'checkout.session.completed'])),
    )
    const completed = receiver.events().find((e) => e.type === 'checkout.session.completed')
    if (completed?.type !== 'checkout.session.completed') throw new Error('no checkout.session.completed')
    expect(completed.data.object).toMatchObject({
      id: session.id,
      payment_status: 'paid',
      client_reference_id: 'estimate-e1-v2',
      payment_intent: intent.id,
    })

    // A paid session's page says so and takes no second payment.
    const again = await submitCard(sessionUrlOf(session), { number: '4242424242424242' })
    expect(again.status).toBe(200)
    expect(again.html).toContain('Payment complete')
    expect((await fakeState(key)).charges).toHaveLength(1)
  })

  it('declines 4000 0000 0000 0002 with generic_decline, keeps the session open and takes a second card', async () => {
    const session = await stripe.checkout.sessions.create(depositParams())
    const declined = await submitCard(sessionUrlOf(session), { number: '4000000000000002' })
    expect(declined.status).toBe(402)
    expect(declined.html).toContain('Your card was declined.')
    expect(declined.html).toContain('<form')

    const afterDecline = await stripe.checkout.sessions.retrieve(session.id, { expand: ['payment_intent'] })
    expect(afterDecline.status).toBe('open')
    const intent = afterDecline.payment_intent
    if (typeof intent !== 'object' || intent === null) throw new Error('payment_intent was not expanded')
    expect(intent.status).toBe('requires_payment_method')
    expect(intent.last_payment_error).toMatchObject({ type: 'card_error', code: 'card_declined', decline_code: 'generic_decline' })
    await vi.waitFor(() => expect(verifiedTypes()).toEqual(['payment_intent.payment_failed']))

    const retried = await submitCard(sessionUrlOf(session), { number: '4242424242424242' })
    expect(retried.status).toBe(303)
    const final = await stripe.paymentIntents.retrieve(intent.id)
    expect(final.status).toBe('succeeded')
    expect(final.last_payment_error).toBeNull()
  })

  it('declines 4000 0000 0000 9995 for insufficient funds', async () => {
    const session = await stripe.checkout.sessions.create(depositParams())
    const declined = await submitCard(sessionUrlOf(session), { number: '4000000000009995' })
    expect(declined.status).toBe(402)
    expect(declined.html).toContain('Your card has insufficient funds.')
    const [intent] = (await fakeState(key)).payment_intents
    expect(intent?.last_payment_error).toMatchObject({ code: 'card_declined', decline_code: 'insufficient_funds' })
    await vi.waitFor(() => expect(verifiedTypes()).toEqual(['payment_intent.payment_failed']))
    const failed = receiver.events()[0]
    if (failed?.type !== 'payment_intent.payment_failed') throw new Error('expected payment_intent.payment_failed')
    expect(failed.data.object.last_payment_error?.decline_code).toBe('insufficient_funds')
  })

  it('asks 4000 0027 6000 3184 for authentication and takes the payment when it passes', async () => {
    const session = await stripe.checkout.sessions.create(depositParams())
    const challenge = await submitCard(sessionUrlOf(session), { number: '4000 0027 6000 3184' })
    expect(challenge.status).toBe(200)
    expect(challenge.html).toContain('Complete authentication')
    expect(challenge.html).toContain('Fail authentication')
    expect((await fakeState(key)).payment_intents[0]?.status).toBe('requires_action')

    const passed = await answerChallenge(sessionUrlOf(session), challenge.html, 'complete')
    expect(passed.status).toBe(303)
    expect(passed.location).toBe(SUCCESS_URL.replace('{CHECKOUT_SESSION_ID}', session.id))
    const state = await fakeState(key)
    expect(state.payment_intents[0]?.status).toBe('succeeded')
    expect(state.charges[0]?.payment_method_details?.card?.three_d_secure?.result).toBe('authenticated')
    await vi.waitFor(() =>
      expect(verifiedTypes()).toEqual(expect.arrayContaining(['payment_intent.succeeded', 'checkout.session.completed'])),
    )
  })

  it('leaves the session open and the payment failed when 3D Secure authentication fails', async () => {
    const session = await stripe.checkout.sessions.create(depositParams())
    const challenge = await submitCard(sessionUrlOf(session), { number: '4000002760003184' })
    const failed = await answerChallenge(sessionUrlOf(session), challenge.html, 'fail')
    expect(failed.status).toBe(402)
    expect(failed.html).toContain('unable to authenticate')
    const after = await stripe.checkout.sessions.retrieve(session.id, { expand: ['payment_intent'] })
    expect(after.status).toBe('open')
    if (typeof after.payment_intent !== 'object' || after.payment_intent === null) throw new Error('payment_intent was not expanded')
    // payment_intent_authentication_failure (Error codes, https://docs.stripe.com/error-codes#payment-intent-authentication-failure).
    expect(after.payment_intent.status).toBe('requires_payment_method')
    expect(after.payment_intent.last_payment_error?.code).toBe('payment_intent_authentication_failure')
    await vi.waitFor(() => expect(verifiedTypes()).toEqual(['payment_intent.payment_failed']))
    expect((await fakeState(key)).charges).toHaveLength(0)
  })

  it('does not take payment on an expired session', async () => {
    const session = await stripe.checkout.sessions.create(depositParams())
    await stripe.checkout.sessions.expire(session.id)
    const page = await fetch(`${new URL(sessionUrlOf(session)).origin}/c/pay/${session.id}`)
    expect(page.status).toBe(410)
    expect(await page.text()).toContain('This payment page has expired')
    const attempt = await submitCard(`${new URL(sessionUrlOf(session)).origin}/c/pay/${session.id}`, { number: '4242424242424242' })
    expect(attempt.status).toBe(410)
    const state = await fakeState(key)
    expect(state.payment_intents).toEqual([])
    expect(state.charges).toEqual([])
    expect(state.checkout_sessions[0]?.status).toBe('expired')
  })

  it('checks the card form before anything is charged', async () => {
    const session = await stripe.checkout.sessions.create(depositParams())
    const badNumber = await submitCard(sessionUrlOf(session), { number: '4242 4242 4242 4241' })
    expect(badNumber.status).toBe(422)
    expect(badNumber.html).toContain('Your card number is invalid.')
    expect(badNumber.html).toContain('aria-invalid="true"')
    const pastExpiry = await submitCard(sessionUrlOf(session), { number: '4242424242424242', expiry: '01 / 20' })
    expect(pastExpiry.status).toBe(422)
    expect(pastExpiry.html).toContain('expiration year is in the past.')
    const shortCvc = await submitCard(sessionUrlOf(session), { number: '4242424242424242', cvc: '12' })
    expect(shortCvc.status).toBe(422)
    expect((await fakeState(key)).payment_intents).toEqual([])
  })

  it('asks for an email when the session has no customer_email', async () => {
    const session = await stripe.checkout.sessions.create(depositParams({ customer_email: undefined }))
    expect(await (await fetch(sessionUrlOf(session))).text()).toContain('<label for="email">')
    expect((await submitCard(sessionUrlOf(session), { number: '4242424242424242' })).status).toBe(422)
    expect((await submitCard(sessionUrlOf(session), { number: '4242424242424242', email: 'owner@example.com' })).status).toBe(303)
    expect((await stripe.checkout.sessions.retrieve(session.id)).customer_details?.email).toBe('owner@example.com')
  })

  it('answers 404 for a session id nobody created', async () => {
    const session = await stripe.checkout.sessions.create(depositParams())
    const res = await fetch(`${new URL(sessionUrlOf(session)).origin}/c/pay/cs_test_nobody`)
    expect(res.status).toBe(404)
  })
})
