import { createHmac } from 'node:crypto'

/**
 * The `Stripe-Signature` header as "Check the webhook signatures" describes it
 * (https://docs.stripe.com/webhooks#verify-manually): `t=<unix seconds>,v1=<hex HMAC-SHA256 of
 * "<t>.<raw body>" keyed with the endpoint's signing secret>`. Exported so tests can sign with
 * a timestamp outside the receiver's tolerance.
 */
export function signWebhookPayload(payload: string, secret: string, timestampSeconds = Math.floor(Date.now() / 1000)): string {
  const signature = createHmac('sha256', secret).update(`${timestampSeconds}.${payload}`, 'utf8').digest('hex')
  return `t=${timestampSeconds},v1=${signature}`
}
