import { randomBytes } from 'node:crypto'
import http from 'node:http'
import type Stripe from 'stripe'
import { createStripeClient } from '../../server/lib/stripe'

/** The payments fake that tests/setup/global.ts started for this run. */
export function fakeUrl(): string {
  const url = process.env.PAYMENTS_FAKE_URL
  if (!url) throw new Error('PAYMENTS_FAKE_URL is not set: run these tests through vitest, whose global setup starts the payments fake.')
  return url
}

/** A new key is a new, empty account in the fake, so tests never see each other's objects. */
export function freshKey(): string {
  return `sk_test_${randomBytes(12).toString('hex')}`
}

export function stripeFor(secretKey: string, apiBase = fakeUrl()): Stripe {
  return createStripeClient({ secretKey, apiBase })
}

export interface FakeState {
  checkout_sessions: Stripe.Checkout.Session[]
  payment_intents: Stripe.PaymentIntent[]
  charges: Stripe.Charge[]
  refunds: Stripe.Refund[]
  events: Stripe.Event[]
  webhook_deliveries: Array<{
    event: string
    type: string
    attempt: number
    status: number | null
    succeeded: boolean
    redelivery: boolean
  }>
}

export async function fakeJson<T>(
  secretKey: string,
  method: 'GET' | 'POST',
  path: string,
  body?: unknown,
  base = fakeUrl(),
): Promise<{ status: number; body: T }> {
  const res = await fetch(`${base}${path}`, {
    method,
    headers: { Authorization: `Bearer ${secretKey}`, ...(body === undefined ? {} : { 'Content-Type': 'application/json' }) },
    ...(body === undefined ? {} : { body: JSON.stringify(body) }),
  })
  return { status: res.status, body: (await res.json()) as T }
}

export async function fakeState(secretKey: string, base = fakeUrl()): Promise<FakeState> {
  const { status, body } = await fakeJson<FakeState>(secretKey, 'GET', '/_fake/state', undefined, base)
  if (status !== 200) throw new Error(`GET /_fake/state answered ${status}`)
  return body
}

export interface ReceivedWebhook {
  body: string
  signature: string
  contentType: string
}

export interface Receiver {
  url: string
  received: ReceivedWebhook[]
  /** Events (parsed bodies) in arrival order. */
  events(): Stripe.Event[]
  close(): Promise<void>
}

/** A little webhook endpoint on 127.0.0.1 that answers with the given statuses in turn, then 200. */
export async function startReceiver(statuses: number[] = []): Promise<Receiver> {
  const received: ReceivedWebhook[] = []
  const queue = [...statuses]
  const server = http.createServer((req, res) => {
    const chunks: Buffer[] = []
    req.on('data', (c: Buffer) => chunks.push(c))
    req.on('end', () => {
      received.push({
        body: Buffer.concat(chunks).toString('utf8'),
        signature: String(req.headers['stripe-signature'] ?? ''),
        contentType: String(req.headers['content-type'] ?? ''),
      })
      res.statusCode = queue.shift() ?? 200
      res.end()
    })
  })
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve))
  const address = server.address()
  if (typeof address !== 'object' || address === null) throw new Error('receiver did not bind')
  return {
    url: `http://127.0.0.1:${address.port}/webhooks/stripe`,
    received,
    events: () => received.map((r) => JSON.parse(r.body) as Stripe.Event),
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve())
        server.closeAllConnections()
      }),
  }
}

export const WEBHOOK_SECRET = 'whsec_test_payments_fake'

export async function pointWebhooksAt(secretKey: string, receiver: Receiver, extra: Record<string, unknown> = {}): Promise<void> {
  const { status } = await fakeJson(secretKey, 'POST', '/_fake/webhook', {
    url: receiver.url,
    secret: WEBHOOK_SECRET,
    backoffMs: 20,
    ...extra,
  })
  if (status !== 200) throw new Error(`POST /_fake/webhook answered ${status}`)
}

export const SUCCESS_URL = 'https://workshop.example/estimates/e1/paid?session={CHECKOUT_SESSION_ID}'
export const CANCEL_URL = 'https://workshop.example/estimates/e1'

/** A deposit session shaped like the product's: one line, GBP, metadata on the session and on its PaymentIntent. */
export function depositParams(overrides: Partial<Stripe.Checkout.SessionCreateParams> = {}): Stripe.Checkout.SessionCreateParams {
  return {
    mode: 'payment',
    line_items: [
      {
        quantity: 1,
        price_data: {
          currency: 'gbp',
          unit_amount: 12345,
          product_data: { name: 'Repair deposit', description: 'Front axle: swivel housing rebuild, both sides' },
        },
      },
    ],
    client_reference_id: 'estimate-e1-v2',
    metadata: { estimateId: 'e1', version: '2' },
    payment_intent_data: { metadata: { estimateId: 'e1', version: '2' } },
    customer_email: 'keeper@example.com',
    success_url: SUCCESS_URL,
    cancel_url: CANCEL_URL,
    ...overrides,
  }
}

export interface PageAnswer {
  status: number
  location: string | null
  html: string
}

/** Posts the payment page's form as a browser without JavaScript would. */
export async function submitCard(
  sessionUrl: string,
  card: { number: string; expiry?: string; cvc?: string; email?: string },
): Promise<PageAnswer> {
  const form = new URLSearchParams({ card_number: card.number, card_expiry: card.expiry ?? '12 / 34', card_cvc: card.cvc ?? '123' })
  if (card.email !== undefined) form.set('email', card.email)
  const res = await fetch(sessionUrl, { method: 'POST', body: form, redirect: 'manual' })
  return { status: res.status, location: res.headers.get('location'), html: await res.text() }
}

/** Presses one of the test 3D Secure page's buttons. */
export async function answerChallenge(sessionUrl: string, challengePage: string, result: 'complete' | 'fail'): Promise<PageAnswer> {
  const challenge = /name="challenge" value="([^"]+)"/.exec(challengePage)?.[1]
  if (!challenge) throw new Error('no 3D Secure challenge on the page')
  const res = await fetch(`${sessionUrl}/authenticate`, {
    method: 'POST',
    body: new URLSearchParams({ challenge, result }),
    redirect: 'manual',
  })
  return { status: res.status, location: res.headers.get('location'), html: await res.text() }
}

export function sessionUrlOf(session: Stripe.Checkout.Session): string {
  if (!session.url) throw new Error(`session ${session.id} has no url (status ${session.status})`)
  return session.url
}
