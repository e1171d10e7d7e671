import type { Logger } from 'pino'
import Stripe from 'stripe'
import { UpstreamError } from '../../lib/errors'

/** Calls to the card payment provider, with its refusals and outages turned into one answer the browser can show. */
export function paymentProvider(stripe: Stripe, logger: Logger) {
  /** Provider refusals and outages become a 502; the details stay in the log. */
  function refusal(what: string, err: unknown): unknown {
    if (!(err instanceof Stripe.errors.StripeError)) return err
    logger.error(
      { err: { type: err.type, code: err.code, message: err.message, requestId: err.requestId, statusCode: err.statusCode } },
      `card payment provider refused to ${what}`,
    )
    return new UpstreamError('The card payment service could not take the request. Please try again in a moment.', 'payment_provider_error')
  }

  async function call<T>(what: string, fn: (stripe: Stripe) => Promise<T>): Promise<T> {
    try {
      return await fn(stripe)
    } catch (err) {
      throw refusal(what, err)
    }
  }

  return {
    call,

    /** The provider's page, or null when it no longer knows it (the local fake forgets everything when restarted). */
    async findSession(sessionId: string): Promise<Stripe.Checkout.Session | null> {
      try {
        return await stripe.checkout.sessions.retrieve(sessionId)
      } catch (err) {
        if (err instanceof Stripe.errors.StripeInvalidRequestError && err.statusCode === 404) return null
        throw refusal('look up a payment page', err)
      }
    },
  }
}

export type PaymentProvider = ReturnType<typeof paymentProvider>
