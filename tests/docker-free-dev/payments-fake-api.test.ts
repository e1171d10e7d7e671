import Stripe from 'stripe'
import { describe, expect, it } from 'vitest'
import { STRIPE_API_VERSION } from '../../server/lib/stripe'
import { CANCEL_URL, depositParams, fakeJson, fakeState, fakeUrl, freshKey, stripeFor, SUCCESS_URL } from './payments-fake-helpers'

/**
 * The Stripe API subset, driven through the official SDK exactly as the server drives it.
 * Sources: Checkout Sessions API (https://docs.stripe.com/api/checkout/sessions), Events
 * (https://docs.stripe.com/api/events), Errors (https://docs.stripe.com/api/errors),
 * Idempotent requests (https://docs.stripe.com/api/idempotent_requests), Authentication
 * (https://docs.stripe.com/api/authentication).
 */
describe('payments fake API', () => {
  it('refuses a request without an API key with 401 and Stripe error shape', async () => {
    // Authentication: a missing key is a 401 invalid_request_error (https://docs.stripe.com/api/errors).
    const res = await fetch(`${fakeUrl()}/v1/checkout/sessions`, { method: 'POST', body: new URLSearchParams({ mode: 'payment' }) })
    expect(res.status).toBe(401)
    const body = (await res.json()) as { error: { type: string; message: string } }
    expect(body.error.type).toBe('invalid_request_error')
    expect(body.error.message).toMatch(/did not provide an API key/)
  })

  it('refuses a key that is not a test secret key, and the SDK reports it as an authentication error', async () => {
    const res = await fetch(`${fakeUrl()}/v1/events/evt_1`, { headers: { Authorization: 'Bearer pk_test_publishable' } })
    expect(res.status).toBe(401)
    // stripe-node maps 401 to StripeAuthenticationError (Errors, https://docs.stripe.com/api/errors/handling).
    const sdk = new Stripe('sk_test_', {
      apiVersion: STRIPE_API_VERSION,
      host: new URL(fakeUrl()).hostname,
      port: new URL(fakeUrl()).port,
      protocol: 'http',
    })
    await expect(sdk.events.retrieve('evt_1')).rejects.toBeInstanceOf(Stripe.errors.StripeAuthenticationError)
  })

  it('creates and retrieves a Checkout Session with the parameters the product sends', async () => {
    const stripe = stripeFor(freshKey())
    const before = Math.floor(Date.now() / 1000)
    const created = await stripe.checkout.sessions.create(depositParams({ metadata: { estimateId: 'e1', note: 'a b&c=d[0] £' } }))
    expect(created.object).toBe('checkout.session')
    expect(created.id).toMatch(/^cs_test_/)
    expect(created).toMatchObject({
      mode: 'payment',
      status: 'open',
      payment_status: 'unpaid',
      currency: 'gbp',
      amount_total: 12345,
      amount_subtotal: 12345,
      client_reference_id: 'estimate-e1-v2',
      customer_email: 'keeper@example.com',
      success_url: SUCCESS_URL,
      cancel_url: CANCEL_URL,
      metadata: { estimateId: 'e1', note: 'a b&c=d[0] £' },
      livemode: false,
      // Since API version 2022-08-01 a session has no PaymentIntent until the customer pays.
      payment_intent: null,
    })
    expect(created.url).toBe(`${fakeUrl()}/c/pay/${created.id}`)
    // expires_at defaults to 24 hours after creation (SessionCreateParams.expires_at).
    expect(created.expires_at).toBeGreaterThanOrEqual(before + 24 * 3600)
    expect(created.expires_at).toBeLessThanOrEqual(Math.floor(Date.now() / 1000) + 24 * 3600)

    const retrieved = await stripe.checkout.sessions.retrieve(created.id)
    expect(retrieved.lastResponse.statusCode).toBe(200)
    const { lastResponse: _a, ...createdFields } = created
    const { lastResponse: _b, ...retrievedFields } = retrieved
    expect(retrievedFields).toEqual(createdFields)
  })

  it('keeps an expires_at inside the allowed 30 minutes to 24 hours and refuses one outside it', async () => {
    const stripe = stripeFor(freshKey())
    const in45 = Math.floor(Date.now() / 1000) + 45 * 60
    expect((await stripe.checkout.sessions.create(depositParams({ expires_at: in45 }))).expires_at).toBe(in45)
    // "It can be anywhere from 30 minutes to 24 hours after Checkout Session creation."
    await expect(
      stripe.checkout.sessions.create(depositParams({ expires_at: Math.floor(Date.now() / 1000) + 10 * 60 })),
    ).rejects.toMatchObject({
      type: 'StripeInvalidRequestError',
      statusCode: 400,
      param: 'expires_at',
    })
  })

  it("answers missing, unknown and invalid parameters with Stripe's 400 and the bracketed param name", async () => {
    const stripe = stripeFor(freshKey())
    await expect(stripe.checkout.sessions.create({ ...depositParams(), line_items: undefined })).rejects.toMatchObject({
      type: 'StripeInvalidRequestError',
      statusCode: 400,
      code: 'parameter_missing',
      param: 'line_items',
    })
    const noQuantity = depositParams()
    delete noQuantity.line_items?.[0]?.quantity
    await expect(stripe.checkout.sessions.create(noQuantity)).rejects.toMatchObject({
      code: 'parameter_missing',
      param: 'line_items[0][quantity]',
    })
    const noName = depositParams({
      line_items: [{ quantity: 1, price_data: { currency: 'gbp', unit_amount: 500, product_data: { name: '' } } }],
    })
    await expect(stripe.checkout.sessions.create(noName)).rejects.toMatchObject({
      code: 'parameter_invalid_empty',
      param: 'line_items[0][price_data][product_data][name]',
    })
    await expect(stripe.checkout.sessions.create({ ...depositParams(), success_url: 'not a url' })).rejects.toMatchObject({
      code: 'url_invalid',
      param: 'success_url',
    })
    await expect(stripe.rawRequest('POST', '/v1/checkout/sessions', { ...depositParams(), colour: 'copper' })).rejects.toMatchObject({
      code: 'parameter_unknown',
      param: 'colour',
    })
  })

  it("refuses a total under the currency's minimum charge", async () => {
    // Minimum charge amounts (https://docs.stripe.com/currencies#minimum-and-maximum-charge-amounts): GBP 0.30.
    const stripe = stripeFor(freshKey())
    const params = (amount: number) =>
      depositParams({
        line_items: [{ quantity: 1, price_data: { currency: 'gbp', unit_amount: amount, product_data: { name: 'Deposit' } } }],
      })
    await expect(stripe.checkout.sessions.create(params(29))).rejects.toMatchObject({ statusCode: 400, code: 'amount_too_small' })
    expect((await stripe.checkout.sessions.create(params(30))).amount_total).toBe(30)
  })

  it('answers an unknown id with 404 resource_missing', async () => {
    const stripe = stripeFor(freshKey())
    await expect(stripe.checkout.sessions.retrieve('cs_test_missing')).rejects.toMatchObject({
      type: 'StripeInvalidRequestError',
      statusCode: 404,
      code: 'resource_missing',
      message: "No such checkout.session: 'cs_test_missing'",
    })
    await expect(stripe.paymentIntents.retrieve('pi_missing')).rejects.toMatchObject({ statusCode: 404, code: 'resource_missing' })
    await expect(stripe.refunds.retrieve('re_missing')).rejects.toMatchObject({ statusCode: 404, code: 'resource_missing' })
    await expect(stripe.events.retrieve('evt_missing')).rejects.toMatchObject({ statusCode: 404, code: 'resource_missing' })
  })

  it('replays the first answer for a reused idempotency key with the same parameters', async () => {
    const key = freshKey()
    const stripe = stripeFor(key)
    const first = await stripe.checkout.sessions.create(depositParams(), { idempotencyKey: 'deposit-e1-v2' })
    const again = await stripe.checkout.sessions.create(depositParams(), { idempotencyKey: 'deposit-e1-v2' })
    expect(again.id).toBe(first.id)
    // Replays carry Idempotent-Replayed: true (Idempotent requests, https://docs.stripe.com/api/idempotent_requests).
    expect(again.lastResponse.headers['idempotent-replayed']).toBe('true')
    expect(first.lastResponse.headers['idempotent-replayed']).toBeUndefined()
    expect((await fakeState(key)).checkout_sessions).toHaveLength(1)
  })

  it('refuses a reused idempotency key with other parameters, or on another endpoint, as an idempotency error', async () => {
    const stripe = stripeFor(freshKey())
    await stripe.checkout.sessions.create(depositParams(), { idempotencyKey: 'deposit-e1-v3' })
    const other = stripe.checkout.sessions.create(depositParams({ client_reference_id: 'estimate-e1-v4' }), {
      idempotencyKey: 'deposit-e1-v3',
    })
    // "errors if they're not the same" — type idempotency_error, which stripe-node raises as StripeIdempotencyError.
    await expect(other).rejects.toBeInstanceOf(Stripe.errors.StripeIdempotencyError)
    await expect(stripe.refunds.create({ payment_intent: 'pi_x' }, { idempotencyKey: 'deposit-e1-v3' })).rejects.toBeInstanceOf(
      Stripe.errors.StripeIdempotencyError,
    )
  })

  it('does not keep the answer to a request that failed validation under its idempotency key', async () => {
    // "If incoming parameters fail validation ... no idempotent result is saved" (Idempotent requests).
    const stripe = stripeFor(freshKey())
    await expect(
      stripe.checkout.sessions.create({ ...depositParams(), success_url: 'nope' }, { idempotencyKey: 'k-1' }),
    ).rejects.toMatchObject({
      statusCode: 400,
    })
    const fixed = await stripe.checkout.sessions.create(depositParams(), { idempotencyKey: 'k-1' })
    expect(fixed.status).toBe('open')
  })

  it('keeps each secret key in its own account', async () => {
    const keyA = freshKey()
    const keyB = freshKey()
    const session = await stripeFor(keyA).checkout.sessions.create(depositParams())
    await expect(stripeFor(keyB).checkout.sessions.retrieve(session.id)).rejects.toMatchObject({ statusCode: 404 })
    expect((await fakeState(keyB)).checkout_sessions).toEqual([])
    expect((await fakeState(keyA)).checkout_sessions.map((s) => s.id)).toEqual([session.id])
    // The same idempotency key in another account is a separate request.
    const a = await stripeFor(keyA).checkout.sessions.create(depositParams(), { idempotencyKey: 'shared' })
    const b = await stripeFor(keyB).checkout.sessions.create(depositParams(), { idempotencyKey: 'shared' })
    expect(a.id).not.toBe(b.id)
  })

  it('expires an open session once, and records checkout.session.expired as an event the API can retrieve', async () => {
    const key = freshKey()
    const stripe = stripeFor(key)
    const session = await stripe.checkout.sessions.create(depositParams())
    const expired = await stripe.checkout.sessions.expire(session.id)
    // Expire a Checkout Session (https://docs.stripe.com/api/checkout/sessions/expire): status expired; url is only set while open.
    expect(expired).toMatchObject({ id: session.id, status: 'expired', url: null })
    await expect(stripe.checkout.sessions.expire(session.id)).rejects.toMatchObject({
      statusCode: 400,
      message: expect.stringMatching(/Only Checkout Sessions with a status in \["open"\] can be expired/),
    })
    const recorded = (await fakeState(key)).events.find((e) => e.type === 'checkout.session.expired')
    if (!recorded) throw new Error('no checkout.session.expired event')
    const event = await stripe.events.retrieve(recorded.id)
    expect(event.type).toBe('checkout.session.expired')
    if (event.type !== 'checkout.session.expired') throw new Error('narrowing')
    expect(event.data.object.id).toBe(session.id)
    expect(event.api_version).toBe(STRIPE_API_VERSION)
    expect(event.request?.id).toBe(expired.lastResponse.requestId)
  })

  it('lets a session expire by itself when its expires_at passes', async () => {
    const key = freshKey()
    const stripe = stripeFor(key)
    const session = await stripe.checkout.sessions.create(depositParams({ expires_at: Math.floor(Date.now() / 1000) + 31 * 60 }))
    const { status } = await fakeJson(key, 'POST', '/_fake/clock', { advanceSeconds: 32 * 60 })
    expect(status).toBe(200)
    expect((await stripe.checkout.sessions.retrieve(session.id)).status).toBe('expired')
    // A session that expires on its own also records checkout.session.expired; automatic events carry an empty request (Events object, request).
    const event = (await fakeState(key)).events.find((e) => e.type === 'checkout.session.expired')
    expect(event?.request).toEqual({ id: null, idempotency_key: null })
  })
})
