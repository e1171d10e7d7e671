/**
 * Card deposits against the project's payments fake (docker-free-dev/payments-fake), which speaks
 * the Stripe API subset the product uses and posts signed webhooks to this app on a real port.
 *
 * Test cards, from Stripe's testing docs (https://docs.stripe.com/testing):
 * 4242 4242 4242 4242 succeeds, 4000 0000 0000 0002 is a generic decline.
 */
import { and, eq, sql } from 'drizzle-orm'
import pg from 'pg'
import pino from 'pino'
import type Stripe from 'stripe'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { auditEvents, depositPayments, jobs, outboundEmails, paymentEvents } from '../../server/db/schema'
import { EnvError, loadEnv } from '../../server/env'
import { systemContext } from '../../server/lib/audit'
import { createStripeClient } from '../../server/lib/stripe'
import { createDepositCheckoutService } from '../../server/modules/payments/deposit-checkout.service'
import { createDepositWebhookService } from '../../server/modules/payments/deposit-webhook.service'
import { createDepositsRepo } from '../../server/modules/payments/deposits.repo'
import { formatMoney } from '../../shared/money'
import { LIVE_CHANNEL, type LiveEvent } from '../../shared/schemas/live'
import { fakeJson, fakeState, freshKey, submitCard } from '../docker-free-dev/payments-fake-helpers'
import { makeTestApp } from './helpers/app'
import { type ConfirmedEstimate, makeConfirmedEstimate } from './helpers/estimates'
import { type Fixture, makeWorkshop, signIn } from './helpers/fixtures'
import { listen } from './helpers/live'

const CARD_OK = '4242 4242 4242 4242'
const CARD_DECLINED = '4000 0000 0000 0002'

const fakeUrl = () => {
  const url = process.env.PAYMENTS_FAKE_URL
  if (!url) throw new Error('PAYMENTS_FAKE_URL is not set: run through vitest, whose global setup starts the payments fake')
  return url
}

/** This file's own account on the fake: the app's key, with webhooks pointed at the app. */
const key = freshKey()
const t = makeTestApp({ STRIPE_SECRET_KEY: key, STRIPE_API_BASE: fakeUrl() })
const stripe = createStripeClient({ secretKey: key, apiBase: fakeUrl() })
const quiet = pino({ level: 'silent' })
const repo = createDepositsRepo(t.db)
const service = createDepositCheckoutService({ repo, stripe, logger: quiet })

/** A second account with no webhook endpoint: its events wait until a test delivers them by hand. */
const silentKey = freshKey()
const silentStripe = createStripeClient({ secretKey: silentKey, apiBase: fakeUrl() })
const silentService = createDepositCheckoutService({ repo, stripe: silentStripe, logger: quiet })

/** The service is called here as a route would call it, without a browser behind the call. */
const caller = systemContext()
const urls = {
  successUrl: 'http://127.0.0.1:3000/portal/deposit/return?session={CHECKOUT_SESSION_ID}',
  cancelUrl: 'http://127.0.0.1:3000/portal/deposit',
}

let server: Awaited<ReturnType<typeof listen>>
let fx: Fixture

beforeAll(async () => {
  server = await listen(t.app)
  const configured = await fakeJson(key, 'POST', '/_fake/webhook', {
    url: `${server.baseUrl}/api/payments/webhook`,
    secret: t.env.STRIPE_WEBHOOK_SECRET,
    backoffMs: 50,
    maxAttempts: 3,
  })
  if (configured.status !== 200) throw new Error(`POST /_fake/webhook answered ${configured.status}`)
  fx = await makeWorkshop(t.db, 'Deposit Works')
}, 30_000)

afterAll(async () => {
  await fakeJson(key, 'POST', '/_fake/reset')
  await fakeJson(silentKey, 'POST', '/_fake/reset')
  await server.close()
  await t.close()
})

async function until<T>(what: string, probe: () => Promise<T | undefined | null | false>, timeoutMs = 10_000): Promise<T> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const value = await probe()
    if (value) return value
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`)
    await new Promise((r) => setTimeout(r, 50))
  }
}

async function depositOf(confirmationId: string) {
  const [row] = await t.db.select().from(depositPayments).where(eq(depositPayments.confirmationId, confirmationId))
  return row
}

const paidDeposit = (confirmationId: string) =>
  until('the deposit to be paid', async () =>
    (await depositOf(confirmationId))?.status === 'paid' ? depositOf(confirmationId) : undefined,
  )

function auditOf(action: string, depositId: string) {
  return t.db
    .select()
    .from(auditEvents)
    .where(and(eq(auditEvents.action, action), sql`${auditEvents.details}->>'depositId' = ${depositId}`))
}

const emailsOf = (estimateId: string, kind: string) =>
  t.db
    .select()
    .from(outboundEmails)
    .where(and(eq(outboundEmails.estimateId, estimateId), eq(outboundEmails.kind, kind)))
const eventRows = (eventId: string) => t.db.select().from(paymentEvents).where(eq(paymentEvents.eventId, eventId))

type CompletedEvent = Stripe.CheckoutSessionCompletedEvent
const isCompletedFor =
  (sessionId: string) =>
  (e: Stripe.Event): e is CompletedEvent =>
    e.type === 'checkout.session.completed' && e.data.object.id === sessionId

async function completedEvent(accountKey: string, sessionId: string): Promise<CompletedEvent> {
  return until('the checkout.session.completed event', async () => (await fakeState(accountKey)).events.find(isCompletedFor(sessionId)))
}

function succeededDeliveries(state: Awaited<ReturnType<typeof fakeState>>, eventId: string) {
  return state.webhook_deliveries.filter((d) => d.event === eventId && d.succeeded)
}

/** Posts an event to the app's webhook as the provider would, signed with `secret` unless a header is given. */
function deliver(body: string, signature: string | null) {
  const req = request(t.app).post('/api/payments/webhook').set('Content-Type', 'application/json')
  return (signature === null ? req : req.set('Stripe-Signature', signature)).send(body)
}

const sign = (body: string, secret = t.env.STRIPE_WEBHOOK_SECRET, timestamp?: number) =>
  stripe.webhooks.generateTestHeaderString({ payload: body, secret, timestamp })

async function payDeposit(c: ConfirmedEstimate) {
  const { url } = await service.startCheckout(caller, c.confirmation.id, urls)
  const page = await submitCard(url, { number: CARD_OK })
  expect(page.status).toBe(303)
  return paidDeposit(c.confirmation.id)
}

describe('paying a deposit', () => {
  it('takes the deposit end to end: payment page, card 4242…, signed webhook, paid row, audit, receipt and live event', async () => {
    const c = await makeConfirmedEstimate(t.db, fx)
    // 25% of the £323.40 tax-inclusive total the fixture's comment works out by hand.
    expect(c.confirmation.depositMinor).toBe(8085)

    const listener = new pg.Client({ connectionString: t.env.DATABASE_URL })
    await listener.connect()
    const live: LiveEvent[] = []
    listener.on('notification', (n) => live.push(JSON.parse(n.payload ?? '{}') as LiveEvent))
    await listener.query(`listen ${LIVE_CHANNEL}`)
    try {
      await t.db.update(jobs).set({ status: 'waiting_for_customer' }).where(eq(jobs.id, fx.job.id))
      const { url, sessionId } = await service.startCheckout(caller, c.confirmation.id, urls)
      const waiting = await depositOf(c.confirmation.id)
      expect(waiting).toMatchObject({
        status: 'awaiting_payment',
        amountMinor: 8085,
        currency: 'GBP',
        checkoutSessionId: sessionId,
        paidAt: null,
      })

      const pageHtml = await (await fetch(url)).text()
      expect(pageHtml).toContain(`Deposit for estimate ${c.reference} v1`)
      expect(pageHtml).toContain(formatMoney(8085, 'GBP'))

      const paid = await submitCard(url, { number: CARD_OK })
      expect(paid.status).toBe(303)
      expect(paid.location).toBe(urls.successUrl.replace('{CHECKOUT_SESSION_ID}', sessionId))

      const row = await paidDeposit(c.confirmation.id)
      expect(row?.paymentIntentId).toMatch(/^pi_/)
      expect(row?.paidAt).toBeInstanceOf(Date)
      // With the deposit in, the job moves on to the work.
      expect((await t.db.select({ status: jobs.status }).from(jobs).where(eq(jobs.id, fx.job.id)))[0]?.status).toBe('in_work')

      const state = await fakeState(key)
      const charge = state.charges.find((ch) => ch.payment_intent === row?.paymentIntentId)
      expect(charge).toMatchObject({ status: 'succeeded', amount: c.confirmation.depositMinor, currency: 'gbp' })
      const event = state.events.find(isCompletedFor(sessionId))
      expect(event && succeededDeliveries(state, event.id).map((d) => d.status)).toEqual([200])

      const audit = await auditOf('deposit.paid', waiting?.id ?? '')
      expect(audit).toHaveLength(1)
      expect(audit[0]).toMatchObject({ workshopId: fx.workshop.id, actorKind: 'system', subjectType: 'estimate', subjectId: c.estimate.id })
      expect(await auditOf('deposit.checkout_started', waiting?.id ?? '')).toHaveLength(1)

      const receipts = await emailsOf(c.estimate.id, 'deposit.paid')
      expect(receipts).toHaveLength(1)
      expect(receipts[0]).toMatchObject({ to: fx.customer.email, subject: `Deposit received for estimate ${c.reference}` })
      expect(JSON.stringify(receipts[0]?.message)).toContain(formatMoney(8085, 'GBP'))

      const announced = await until('the live event', async () =>
        live.find((e) => e.type === 'estimate.deposit_paid' && e.estimateId === c.estimate.id),
      )
      expect(announced).toMatchObject({ workshopId: fx.workshop.id, status: 'deposit_paid' })

      expect(await service.getCheckoutStatus(sessionId)).toMatchObject({ state: 'paid', deposit: { status: 'paid', amountMinor: 8085 } })
      expect(await service.getDepositForConfirmation(c.confirmation.id)).toMatchObject({ status: 'paid', currency: 'GBP' })
      await expect(service.startCheckout(caller, c.confirmation.id, urls)).rejects.toMatchObject({ status: 409, code: 'already_paid' })
    } finally {
      await listener.end()
    }
  }, 30_000)

  it('pays once when the same event is delivered five times by the fake', async () => {
    const c = await makeConfirmedEstimate(t.db, fx)
    const first = await payDeposit(c)
    const event = await completedEvent(key, first?.checkoutSessionId ?? '')
    for (let i = 0; i < 4; i++) expect((await fakeJson(key, 'POST', `/_fake/events/${event.id}/resend`)).status).toBe(202)
    await until('five successful deliveries', async () => succeededDeliveries(await fakeState(key), event.id).length === 5)

    const row = await depositOf(c.confirmation.id)
    expect(row?.status).toBe('paid')
    expect(row?.paidAt?.toISOString()).toBe(first?.paidAt?.toISOString())
    expect(await auditOf('deposit.paid', row?.id ?? '')).toHaveLength(1)
    expect(await emailsOf(c.estimate.id, 'deposit.paid')).toHaveLength(1)
    expect(await eventRows(event.id)).toHaveLength(1)
  }, 30_000)

  it('pays once when five copies of one event arrive at the same moment; "being confirmed" until then', async () => {
    const c = await makeConfirmedEstimate(t.db, fx)
    const { url, sessionId } = await silentService.startCheckout(caller, c.confirmation.id, urls)
    expect((await submitCard(url, { number: CARD_OK })).status).toBe(303)
    const event = await completedEvent(silentKey, sessionId)
    // The provider has the money; only its webhook may say so here.
    expect(await silentService.getCheckoutStatus(sessionId)).toMatchObject({ state: 'confirming', deposit: { status: 'awaiting_payment' } })

    const body = JSON.stringify(event, null, 2)
    const answers = await Promise.all(Array.from({ length: 5 }, () => deliver(body, sign(body))))
    expect(answers.map((a) => a.status)).toEqual([200, 200, 200, 200, 200])

    const row = await depositOf(c.confirmation.id)
    expect(row).toMatchObject({ status: 'paid', paidAt: new Date(event.created * 1000) })
    expect(await auditOf('deposit.paid', row?.id ?? '')).toHaveLength(1)
    expect(await emailsOf(c.estimate.id, 'deposit.paid')).toHaveLength(1)
    expect(await eventRows(event.id)).toHaveLength(1)
    expect(await silentService.getCheckoutStatus(sessionId)).toMatchObject({ state: 'paid' })
  }, 30_000)

  it('refuses a missing, wrong, stale or tampered signature with 400 and records nothing', async () => {
    const c = await makeConfirmedEstimate(t.db, fx)
    const { url, sessionId } = await silentService.startCheckout(caller, c.confirmation.id, urls)
    expect((await submitCard(url, { number: CARD_OK })).status).toBe(303)
    const event = await completedEvent(silentKey, sessionId)
    const body = JSON.stringify(event)
    const tampered = JSON.stringify({ ...event, data: { object: { ...event.data.object, amount_total: 1 } } })

    const attempts = [
      deliver(body, null),
      deliver(body, sign(body, 'whsec_not_the_right_secret')),
      deliver(body, sign(body, t.env.STRIPE_WEBHOOK_SECRET, Math.floor(Date.now() / 1000) - 3600)),
      deliver(tampered, sign(body)),
      deliver(body, 'garbage'),
    ]
    for (const res of await Promise.all(attempts)) {
      expect(res.status).toBe(400)
      expect(res.body.error.code).toBe('bad_signature')
    }
    expect(await eventRows(event.id)).toHaveLength(0)
    expect(await depositOf(c.confirmation.id)).toMatchObject({ status: 'awaiting_payment', paidAt: null })

    // The same bytes, properly signed, are accepted: the refusals were about the signature alone.
    expect((await deliver(body, sign(body))).status).toBe(200)
    expect((await depositOf(c.confirmation.id))?.status).toBe('paid')
  }, 30_000)

  it('answers 2xx to a signed event about a payment page it never made, changes nothing and logs a warning', async () => {
    const session = await stripe.checkout.sessions.create({
      mode: 'payment',
      line_items: [{ quantity: 1, price_data: { currency: 'gbp', unit_amount: 2500, product_data: { name: 'Made elsewhere' } } }],
      success_url: 'http://127.0.0.1:3000/elsewhere',
      metadata: { note: 'not ours' },
    })
    expect((await submitCard(session.url ?? '', { number: CARD_OK, email: 'someone@example.test' })).status).toBe(303)
    const event = await completedEvent(key, session.id)
    await until('the delivery to be accepted', async () => succeededDeliveries(await fakeState(key), event.id).length === 1)
    expect(await eventRows(event.id)).toHaveLength(0)
    expect(await t.db.select().from(depositPayments).where(eq(depositPayments.checkoutSessionId, session.id))).toHaveLength(0)

    const lines: { level: number; msg: string; eventId?: string }[] = []
    const logger = pino({ level: 'info' }, { write: (line: string) => void lines.push(JSON.parse(line) as (typeof lines)[number]) })
    const watched = createDepositWebhookService({ repo, stripe, env: t.env, logger, outbox: t.outbox })
    const delivered = JSON.stringify(event)
    expect(await watched.handleWebhook(Buffer.from(delivered), sign(delivered), caller)).toBe('unknown')
    // pino's level 40 is "warn".
    expect(lines.filter((l) => l.level === 40 && l.eventId === event.id)).toHaveLength(1)
    expect(await eventRows(event.id)).toHaveLength(0)
  }, 30_000)

  it('leaves the deposit unpaid after a declined card, and the next try gets a page that takes a good card', async () => {
    const c = await makeConfirmedEstimate(t.db, fx)
    const first = await service.startCheckout(caller, c.confirmation.id, urls)
    const declined = await submitCard(first.url, { number: CARD_DECLINED })
    expect(declined.status).toBe(402)

    const failed = await until('the payment_failed delivery', async () => {
      const state = await fakeState(key)
      const event = state.events.find(
        (e) => e.type === 'payment_intent.payment_failed' && e.data.object.metadata?.confirmationId === c.confirmation.id,
      )
      return event && succeededDeliveries(state, event.id).length === 1 ? event : undefined
    })
    expect(await eventRows(failed.id)).toHaveLength(1)
    const row = await depositOf(c.confirmation.id)
    expect(row).toMatchObject({ status: 'awaiting_payment', paidAt: null, paymentIntentId: null })
    expect(await auditOf('deposit.paid', row?.id ?? '')).toHaveLength(0)

    // A declined card leaves Stripe's page open for another card, so trying again returns it.
    const again = await service.startCheckout(caller, c.confirmation.id, urls)
    expect(again).toEqual(first)
    expect((await fetch(again.url)).status).toBe(200)
    expect((await submitCard(again.url, { number: CARD_OK })).status).toBe(303)
    const paid = await paidDeposit(c.confirmation.id)
    const charges = (await fakeState(key)).charges.filter((ch) => ch.payment_intent === paid?.paymentIntentId)
    expect(charges.map((ch) => [ch.status, ch.amount])).toEqual([
      ['failed', c.confirmation.depositMinor],
      ['succeeded', c.confirmation.depositMinor],
    ])
  }, 30_000)

  it('makes a fresh page under the next attempt key when the previous one expired unpaid', async () => {
    const c = await makeConfirmedEstimate(t.db, fx)
    const first = await service.startCheckout(caller, c.confirmation.id, urls)
    await stripe.checkout.sessions.expire(first.sessionId)
    await until('the expiry delivery', async () => {
      const state = await fakeState(key)
      const event = state.events.find((e) => e.type === 'checkout.session.expired' && e.data.object.id === first.sessionId)
      return event && succeededDeliveries(state, event.id).length === 1
    })
    expect(await depositOf(c.confirmation.id)).toMatchObject({ status: 'awaiting_payment', checkoutSessionId: first.sessionId })
    expect((await submitCard(first.url, { number: CARD_OK })).status).toBe(410)

    const second = await service.startCheckout(caller, c.confirmation.id, urls)
    expect(second.sessionId).not.toBe(first.sessionId)
    expect(await service.startCheckout(caller, c.confirmation.id, urls)).toEqual(second)
    const sessions = (await fakeState(key)).checkout_sessions.filter((s) => s.metadata?.confirmationId === c.confirmation.id)
    expect(sessions.map((s) => [s.id, s.metadata?.attempt, s.status])).toEqual([
      [first.sessionId, '1', 'expired'],
      [second.sessionId, '2', 'open'],
    ])
    expect(await service.getCheckoutStatus(first.sessionId).catch((e: unknown) => e)).toMatchObject({ status: 404 })
    expect(await service.getCheckoutStatus(second.sessionId)).toMatchObject({ state: 'open' })

    expect((await submitCard(second.url, { number: CARD_OK })).status).toBe(303)
    expect((await paidDeposit(c.confirmation.id))?.checkoutSessionId).toBe(second.sessionId)
  }, 30_000)

  it('makes one payment page when two requests for it arrive together', async () => {
    const c = await makeConfirmedEstimate(t.db, fx)
    const [a, b] = await Promise.all([
      service.startCheckout(caller, c.confirmation.id, urls),
      service.startCheckout(caller, c.confirmation.id, urls),
    ])
    expect(a).toEqual(b)
    const sessions = (await fakeState(key)).checkout_sessions.filter((s) => s.metadata?.confirmationId === c.confirmation.id)
    expect(sessions.map((s) => s.id)).toEqual([a?.sessionId])
    const rows = await t.db.select().from(depositPayments).where(eq(depositPayments.confirmationId, c.confirmation.id))
    expect(rows).toHaveLength(1)
    const depositId = rows[0]?.id ?? ''
    expect(await auditOf('deposit.checkout_started', depositId)).toHaveLength(1)

    // Again once the deposit row exists and its page has expired: the row lock, not the insert, now keeps them apart.
    await stripe.checkout.sessions.expire(a?.sessionId ?? '')
    const [c2, d2] = await Promise.all([
      service.startCheckout(caller, c.confirmation.id, urls),
      service.startCheckout(caller, c.confirmation.id, urls),
    ])
    expect(c2).toEqual(d2)
    expect(c2?.sessionId).not.toBe(a?.sessionId)
    const after = (await fakeState(key)).checkout_sessions.filter((s) => s.metadata?.confirmationId === c.confirmation.id)
    expect(after.map((s) => s.metadata?.attempt)).toEqual(['1', '2'])
    expect(await auditOf('deposit.checkout_started', depositId)).toHaveLength(2)
  }, 30_000)

  it('makes a new page when the provider no longer knows the last one', async () => {
    const forgetfulKey = freshKey()
    const forgetful = createDepositCheckoutService({
      repo,
      stripe: createStripeClient({ secretKey: forgetfulKey, apiBase: fakeUrl() }),
      logger: quiet,
    })
    const c = await makeConfirmedEstimate(t.db, fx)
    const first = await forgetful.startCheckout(caller, c.confirmation.id, urls)
    // Restarting the local fake loses its state the same way.
    expect((await fakeJson(forgetfulKey, 'POST', '/_fake/reset')).status).toBe(200)
    expect(await forgetful.getCheckoutStatus(first.sessionId)).toMatchObject({ state: 'expired' })
    const second = await forgetful.startCheckout(caller, c.confirmation.id, urls)
    expect(second.sessionId).not.toBe(first.sessionId)
    expect((await fetch(second.url)).status).toBe(200)
    expect((await depositOf(c.confirmation.id))?.checkoutSessionId).toBe(second.sessionId)
    await fakeJson(forgetfulKey, 'POST', '/_fake/reset')
  }, 30_000)

  it('answers 502 and keeps nothing when the provider cannot be reached', async () => {
    const closed = await listen(t.app)
    const unreachable = closed.baseUrl
    await closed.close()
    const offline = createDepositCheckoutService({
      repo,
      stripe: createStripeClient({ secretKey: freshKey(), apiBase: unreachable }),
      logger: quiet,
    })
    const c = await makeConfirmedEstimate(t.db, fx)
    await expect(offline.startCheckout(caller, c.confirmation.id, urls)).rejects.toMatchObject({
      status: 502,
      code: 'payment_provider_error',
    })
    expect(await depositOf(c.confirmation.id)).toBeUndefined()
  }, 30_000)

  it('refuses a payment page when no deposit is due', async () => {
    const c = await makeConfirmedEstimate(t.db, fx, { depositMinor: 0 })
    await expect(service.startCheckout(caller, c.confirmation.id, urls)).rejects.toMatchObject({ status: 409, code: 'no_deposit_due' })
    expect(await depositOf(c.confirmation.id)).toBeUndefined()
  })
})

describe('refunding a deposit', () => {
  it('refunds a paid deposit on the provider and in the record, once', async () => {
    const c = await makeConfirmedEstimate(t.db, fx)
    const paid = await payDeposit(c)
    const advisor = await signIn(t.app, fx.advisor.email)

    const res = await advisor.post(`/api/estimates/${c.estimate.id}/deposit/refund`).expect(200)
    expect(res.body).toMatchObject({ id: paid?.id, status: 'refunded', amountMinor: 8085, refundedMinor: 8085 })

    const row = await depositOf(c.confirmation.id)
    expect(row).toMatchObject({ status: 'refunded', refundedMinor: c.confirmation.depositMinor })
    expect(row?.refundId).toMatch(/^re_/)
    expect(row?.refundedAt).toBeInstanceOf(Date)

    const state = await fakeState(key)
    const refund = state.refunds.find((r) => r.id === row?.refundId)
    expect(refund).toMatchObject({ amount: c.confirmation.depositMinor, payment_intent: paid?.paymentIntentId, status: 'succeeded' })
    expect(state.charges.find((ch) => ch.payment_intent === paid?.paymentIntentId)).toMatchObject({ refunded: true, amount_refunded: 8085 })

    const audit = await auditOf('deposit.refunded', row?.id ?? '')
    expect(audit).toHaveLength(1)
    expect(audit[0]).toMatchObject({ actorKind: 'staff', actorId: fx.advisor.id, subjectId: c.estimate.id })
    expect(await emailsOf(c.estimate.id, 'deposit.refunded')).toHaveLength(1)

    const again = await advisor.post(`/api/estimates/${c.estimate.id}/deposit/refund`).expect(409)
    expect(again.body.error.code).toBe('already_refunded')
    expect((await fakeState(key)).refunds.filter((r) => r.payment_intent === paid?.paymentIntentId)).toHaveLength(1)
  }, 30_000)

  it('answers 409 for a deposit not paid, and 404 for another workshop', async () => {
    const unpaid = await makeConfirmedEstimate(t.db, fx)
    await service.startCheckout(caller, unpaid.confirmation.id, urls)
    const owner = await signIn(t.app, fx.owner.email)
    const res = await owner.post(`/api/estimates/${unpaid.estimate.id}/deposit/refund`).expect(409)
    expect(res.body.error.code).toBe('not_paid')
    expect(await depositOf(unpaid.confirmation.id)).toMatchObject({ status: 'awaiting_payment', refundId: null })

    const other = await makeWorkshop(t.db, 'Elsewhere Works')
    const stranger = await signIn(t.app, other.owner.email)
    await stranger.post(`/api/estimates/${unpaid.estimate.id}/deposit/refund`).expect(404)
  }, 30_000)
})

describe('payment settings', () => {
  const base = { DATABASE_URL: 'postgres://u:p@127.0.0.1:5432/tickover_test' }
  // Production also requires the text message settings (tests/server/env.test.ts); given here so only payments are in question.
  const texts = { TWILIO_ACCOUNT_SID: `AC${'1a'.repeat(16)}`, TWILIO_AUTH_TOKEN: '2b'.repeat(16), TWILIO_FROM: '+447700900123' }
  const fieldsOf = (input: Record<string, string>) => {
    try {
      loadEnv(input)
      return []
    } catch (err) {
      if (err instanceof EnvError) return err.fields.map((f) => f.field).sort()
      throw err
    }
  }

  it("uses the local fake's key and secret outside production, and the fake as the API when it runs", () => {
    const env = loadEnv({ ...base, PAYMENTS_FAKE_URL: 'http://127.0.0.1:12111' })
    expect(env).toMatchObject({
      STRIPE_SECRET_KEY: 'sk_test_local_payments_fake',
      STRIPE_WEBHOOK_SECRET: 'whsec_local_payments_fake',
      STRIPE_API_BASE: 'http://127.0.0.1:12111',
    })
    expect(loadEnv(base).STRIPE_API_BASE).toBeUndefined()
    expect(loadEnv({ ...base, PAYMENTS_FAKE_URL: 'http://127.0.0.1:12111', STRIPE_API_BASE: 'http://127.0.0.1:9' }).STRIPE_API_BASE).toBe(
      'http://127.0.0.1:9',
    )
  })

  it('requires a real key and webhook secret in production and refuses malformed ones', () => {
    expect(fieldsOf({ ...base, ...texts, NODE_ENV: 'production' })).toEqual(['STRIPE_SECRET_KEY', 'STRIPE_WEBHOOK_SECRET'])
    expect(
      fieldsOf({ ...base, ...texts, NODE_ENV: 'production', STRIPE_SECRET_KEY: 'sk_live_abc123', STRIPE_WEBHOOK_SECRET: 'whsec_abc123' }),
    ).toEqual([])
    expect(fieldsOf({ ...base, STRIPE_SECRET_KEY: 'pk_test_abc', STRIPE_WEBHOOK_SECRET: 'secret' })).toEqual([
      'STRIPE_SECRET_KEY',
      'STRIPE_WEBHOOK_SECRET',
    ])
  })
})
