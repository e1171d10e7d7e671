import Stripe from 'stripe'
import { describe, expect, it } from 'vitest'
import { createStripeClient, STRIPE_API_VERSION } from '../../server/lib/stripe'
import { fakeUrl, freshKey } from './payments-fake-helpers'

describe('createStripeClient', () => {
  it('pins the API version this SDK was built for', () => {
    // stripe-node: "This library's types only reflect the latest API version" (StripeConfig.apiVersion).
    expect(STRIPE_API_VERSION).toBe(Stripe.API_VERSION)
  })

  it('sends requests to the fake given as apiBase, with the pinned Stripe-Version header', async () => {
    const stripe = createStripeClient({ secretKey: freshKey(), apiBase: fakeUrl() })
    expect(stripe.resolveBaseAddress('api')).toBe('127.0.0.1')
    expect(String(stripe.getApiField('port'))).toBe(new URL(fakeUrl()).port)
    expect(stripe.getApiField('protocol')).toBe('http')
    const res = await stripe.events.retrieve('evt_none').catch((e: unknown) => e)
    expect(res).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError)
    if (!(res instanceof Stripe.errors.StripeInvalidRequestError)) throw new Error('narrowing')
    expect(res.statusCode).toBe(404)
    expect(res.headers?.['stripe-version']).toBe(STRIPE_API_VERSION)
  })

  it('refuses to send anything but a test key to a stand-in, and refuses an apiBase with a path', () => {
    expect(() => createStripeClient({ secretKey: 'sk_live_abc', apiBase: fakeUrl() })).toThrow(/test secret key/)
    expect(() => createStripeClient({ secretKey: freshKey(), apiBase: `${fakeUrl()}/v1` })).toThrow(/without a path/)
    expect(() => createStripeClient({ secretKey: freshKey(), apiBase: 'ftp://127.0.0.1' })).toThrow(/http or https/)
  })

  it('talks to Stripe itself when no apiBase is given', () => {
    const stripe = createStripeClient({ secretKey: 'sk_test_not_used' })
    // The SDK's default is https to api.stripe.com (stripe-node README, "Configuration").
    expect(stripe.resolveBaseAddress('api')).toBe('api.stripe.com')
    expect(stripe.getApiField('protocol')).toBe('https')
    expect(stripe.getMaxNetworkRetries()).toBe(2)
  })
})
