import Stripe from 'stripe'

/**
 * The API version this code is written against: the one stripe@23.1.0 ships with
 * (`Stripe.API_VERSION`). Written out rather than read at run time so that upgrading the SDK
 * fails the type-check here until someone has read the changelog and moved it on purpose.
 */
export const STRIPE_API_VERSION = '2026-10-28.endive' satisfies Stripe.LatestApiVersion

export interface StripeClientOptions {
  secretKey: string
  /** e.g. "http://127.0.0.1:12111" for the local payments fake; leave out to talk to Stripe. */
  apiBase?: string
}

/**
 * The server's Stripe client: the official SDK, pointed at the payments fake through the SDK's
 * own host/port/protocol settings when `apiBase` is given, so that the same calls run unchanged
 * against Stripe's test or live mode when it is not.
 */
export function createStripeClient({ secretKey, apiBase }: StripeClientOptions): Stripe {
  if (!secretKey) throw new Error('A Stripe secret key is required (STRIPE_SECRET_KEY).')
  const common = {
    apiVersion: STRIPE_API_VERSION,
    // Two retries ride out a dropped connection or a 5xx; the SDK puts an idempotency key on every POST, so a retried create is not doubled.
    maxNetworkRetries: 2,
    // Checkout and refund calls answer in well under a second; 20 s fails a hung request long before the SDK's default 80 s.
    timeout: 20_000,
  } as const
  if (!apiBase) return new Stripe(secretKey, common)

  let base: URL
  try {
    base = new URL(apiBase)
  } catch {
    throw new Error(`STRIPE_API_BASE is not a URL: ${apiBase}`)
  }
  if (base.protocol !== 'http:' && base.protocol !== 'https:') throw new Error(`STRIPE_API_BASE must be http or https: ${apiBase}`)
  if (base.pathname !== '/' || base.search || base.hash) throw new Error(`STRIPE_API_BASE must be an origin without a path: ${apiBase}`)
  if (!secretKey.startsWith('sk_test_'))
    throw new Error('Only a test secret key (sk_test_…) may be sent to a Stripe stand-in set by STRIPE_API_BASE.')
  const protocol = base.protocol === 'https:' ? 'https' : 'http'
  return new Stripe(secretKey, {
    ...common,
    host: base.hostname.replace(/^\[(.*)\]$/, '$1'),
    port: base.port || (protocol === 'https' ? 443 : 80),
    protocol,
  })
}
