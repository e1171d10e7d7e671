/**
 * The deposit webhook's rules, on the service alone, with a fake outbox and a fake repository whose
 * transaction keeps its writes only when it ends without an error, as PostgreSQL's does. Events are
 * signed with the Stripe SDK's own test helper (`webhooks.generateTestHeaderString`), so the
 * signature check is the SDK's real one.
 */
import { randomUUID } from 'node:crypto'
import pino from 'pino'
import { describe, expect, it } from 'vitest'
import { type AuditEntry, systemContext } from '../../server/lib/audit'
import { createStripeClient } from '../../server/lib/stripe'
import { createDepositWebhookService, type DepositWebhookDeps } from '../../server/modules/payments/deposit-webhook.service'
import type { ConfirmationDetails, DepositRow } from '../../server/modules/payments/deposits.repo'
import type { JobStatus } from '../../shared/schemas/records'
import { fakeOutbox, fakeTx, portalSnapshot } from './helpers/portal'

const SECRET = 'whsec_unit_test_secret'
const stripe = createStripeClient({ secretKey: 'sk_test_unit' })
const sign = (body: string, secret = SECRET) => stripe.webhooks.generateTestHeaderString({ payload: body, secret })

const ctx = systemContext('req-webhook')

/** The deposit asked for, £80.85. */
const AMOUNT = 8085

interface Stored {
  events: string[]
  deposits: DepositRow[]
  audit: AuditEntry[]
  live: string[]
  jobMoves: { workshopId: string; jobId: string; from: readonly JobStatus[]; to: JobStatus }[]
}

/** One confirmation with a deposit awaiting payment on checkout session `cs_…`, and a webhook service over it. */
function world() {
  const workshopId = randomUUID()
  const customer = { id: randomUUID(), name: 'Dana Fielding', email: 'dana@fixture.test' }
  const estimate = { id: randomUUID(), number: 42, jobId: randomUUID(), withdrawnAt: null }
  const confirmationId = randomUUID()
  const sessionId = `cs_test_${randomUUID().replaceAll('-', '')}`
  const details: ConfirmationDetails = {
    confirmation: { id: confirmationId, workshopId, depositMinor: AMOUNT },
    version: { id: randomUUID(), version: 1, snapshot: portalSnapshot({ estimateId: estimate.id, customer }) },
    estimate,
    workshop: { id: workshopId, name: 'Ridgeway 4x4', email: 'desk@ridgeway.test' },
    customer,
  }
  const deposit: DepositRow = {
    id: randomUUID(),
    workshopId,
    confirmationId,
    amountMinor: AMOUNT,
    currency: 'GBP',
    status: 'awaiting_payment',
    checkoutSessionId: sessionId,
    paymentIntentId: null,
    paidAt: null,
    refundId: null,
    refundedMinor: null,
    refundedAt: null,
    createdAt: new Date(),
    updatedAt: new Date(),
  }
  let db: Stored = { events: [], deposits: [deposit], audit: [], live: [], jobMoves: [] }
  const find = (match: (d: DepositRow) => boolean) => db.deposits.find(match)

  const repo: DepositWebhookDeps['repo'] = {
    transaction: async (fn) => {
      const before = structuredClone(db)
      try {
        return await fn(fakeTx)
      } catch (err) {
        db = before
        throw err
      }
    },
    recordEvent: async (_q, eventId) => {
      if (db.events.includes(eventId)) return false
      db.events.push(eventId)
      return true
    },
    lockBySession: async (_q, id) => find((d) => d.checkoutSessionId === id),
    lockById: async (_q, id) => find((d) => d.id === id),
    update: async (_q, id, values) => {
      const row = find((d) => d.id === id)
      if (!row) throw new Error(`no deposit ${id}`)
      Object.assign(row, values)
      return { ...row }
    },
    confirmationDetails: async (_q, id) => (id === confirmationId ? details : undefined),
    setJobStatus: async (_q, ws, jobId, from, to) => {
      db.jobMoves.push({ workshopId: ws, jobId, from, to })
      return true
    },
    recordAudit: async (_q, _ctx, entry) => {
      db.audit.push(entry)
    },
    publishLive: async (_q, event) => {
      db.live.push(event.type)
    },
  }

  const outbox = fakeOutbox()
  const lines: { level: number; msg: string }[] = []
  const logger = pino({ level: 'info' }, { write: (line: string) => void lines.push(JSON.parse(line) as (typeof lines)[number]) })
  const service = createDepositWebhookService({
    repo,
    stripe,
    env: { STRIPE_WEBHOOK_SECRET: SECRET },
    logger,
    outbox,
  })

  /** The body the provider posts when a checkout session is paid: `checkout.session.completed` as its API documents it. */
  const completed = (
    change: { eventId?: string; id?: string; amount?: number; currency?: string; metadata?: Record<string, string> } = {},
  ) =>
    JSON.stringify({
      id: change.eventId ?? `evt_${randomUUID().replaceAll('-', '')}`,
      object: 'event',
      type: 'checkout.session.completed',
      created: 1_767_225_600,
      livemode: false,
      pending_webhooks: 1,
      request: { id: null, idempotency_key: null },
      data: {
        object: {
          id: change.id ?? sessionId,
          object: 'checkout.session',
          status: 'complete',
          payment_status: 'paid',
          payment_intent: 'pi_test_unit',
          amount_total: change.amount ?? AMOUNT,
          currency: change.currency ?? 'gbp',
          metadata: change.metadata ?? { depositId: deposit.id, confirmationId },
        },
      },
    })

  /** What the webhook route hands the service: the bytes received and the signature header, if any. */
  const post = (body: string, signature: string | undefined) => service.handleWebhook(Buffer.from(body), signature, ctx)
  /** A delivery signed as the provider signs it. */
  const deliver = (body: string) => post(body, sign(body))
  return { details, deposit: () => db.deposits[0], stored: () => db, emails: outbox.queued, lines, completed, post, deliver }
}

describe('the deposit webhook', () => {
  it('refuses a missing or wrong signature with 400 and records nothing', async () => {
    const w = world()
    const body = w.completed()
    for (const signature of [undefined, sign(body, 'whsec_not_the_right_secret'), 'garbage', sign(w.completed({ amount: 1 }))]) {
      await expect(w.post(body, signature)).rejects.toMatchObject({ status: 400, code: 'bad_signature' })
    }
    expect(w.stored()).toMatchObject({ events: [], audit: [], live: [], jobMoves: [] })
    expect(w.emails).toEqual([])
    expect(w.deposit()).toMatchObject({ status: 'awaiting_payment', paidAt: null })
  })

  it('marks a paid session’s deposit paid, moves the job to the work, and sends the receipt', async () => {
    const w = world()
    expect(await w.deliver(w.completed())).toBe('paid')

    expect(w.deposit()).toMatchObject({ status: 'paid', paidAt: new Date(1_767_225_600 * 1000), paymentIntentId: 'pi_test_unit' })
    const { workshop, estimate } = w.details
    expect(w.stored().jobMoves).toEqual([{ workshopId: workshop.id, jobId: estimate.jobId, from: ['waiting_for_customer'], to: 'in_work' }])
    expect(w.stored().audit).toEqual([
      expect.objectContaining({ action: 'deposit.paid', actor: { kind: 'system', name: 'Card payment' }, workshopId: workshop.id }),
    ])
    expect(w.stored().live).toEqual(['estimate.deposit_paid'])
    expect(w.emails).toEqual([
      expect.objectContaining({ kind: 'deposit.paid', to: 'dana@fixture.test', subject: 'Deposit received for estimate E-0042' }),
    ])
    expect(w.emails[0]?.text).toContain('has received your deposit of £80.85')
  })

  it('applies the same event id once, however often it is delivered', async () => {
    const w = world()
    const body = w.completed({ eventId: 'evt_once' })
    expect(await w.deliver(body)).toBe('paid')
    const paidAt = w.deposit()?.paidAt
    expect(await w.deliver(body)).toBe('duplicate')
    expect(await w.deliver(body)).toBe('duplicate')

    expect(w.stored()).toMatchObject({ events: ['evt_once'], live: ['estimate.deposit_paid'] })
    expect(w.stored().audit).toHaveLength(1)
    expect(w.stored().jobMoves).toHaveLength(1)
    expect(w.emails).toHaveLength(1)
    expect(w.deposit()?.paidAt).toEqual(paidAt)
  })

  it('marks the deposit paid once when a second event reports the same payment', async () => {
    const w = world()
    expect(await w.deliver(w.completed())).toBe('paid')
    expect(await w.deliver(w.completed())).toBe('already_paid')
    expect(w.stored().events).toHaveLength(2)
    expect(w.stored().audit).toHaveLength(1)
    expect(w.stored().jobMoves).toHaveLength(1)
    expect(w.emails).toHaveLength(1)
  })

  // Today's rule: the money has been taken, so the deposit is recorded paid and the mismatch is logged for staff.
  it('records a payment of another amount or currency as paid and logs it as an error', async () => {
    for (const change of [{ amount: AMOUNT - 1 }, { currency: 'eur' }]) {
      const w = world()
      expect(await w.deliver(w.completed(change))).toBe('paid')
      expect(w.deposit()?.status).toBe('paid')
      // pino's level 50 is "error".
      expect(w.lines.filter((l) => l.level === 50).map((l) => l.msg)).toEqual(['deposit paid with an amount other than the one asked for'])
    }
  })

  it('acknowledges a session it never made without changing anything', async () => {
    const w = world()
    const body = w.completed({ id: 'cs_test_made_elsewhere', metadata: { note: 'not ours' } })
    expect(await w.deliver(body)).toBe('unknown')

    // The event id is not kept either: the transaction that recorded it was rolled back.
    expect(w.stored()).toMatchObject({ events: [], audit: [], live: [], jobMoves: [] })
    expect(w.emails).toEqual([])
    expect(w.deposit()).toMatchObject({ status: 'awaiting_payment', paidAt: null })
    // pino's level 40 is "warn".
    expect(w.lines.filter((l) => l.level === 40).map((l) => l.msg)).toEqual(['payment event for an unknown payment ignored'])
  })
})
