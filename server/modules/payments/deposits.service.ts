import type { Request } from 'express'
import type { Logger } from 'pino'
import Stripe from 'stripe'
import { z } from 'zod'
import type { Database } from '../../db/client'
import type { Env } from '../../env'
import { auditContextOf, recordAudit } from '../../lib/audit'
import { AppError, ConflictError, NotFoundError } from '../../lib/errors'
import { publishLive } from '../../lib/live-publish'
import type { EmailOutbox } from '../email/outbox'
import type { StaffPrincipal } from '../../../shared/schemas/auth'
import { estimateReference } from '../../../shared/schemas/estimates'
import type { CheckoutStatus, Deposit, StartCheckoutResult } from '../../../shared/schemas/payments'
import { formatMoney } from '../../../shared/money'
import { createDepositsRepo, type DepositRow, type Tx } from './deposits.repo'

export interface DepositsDeps {
  db: Database
  stripe: Stripe
  env: Pick<Env, 'STRIPE_WEBHOOK_SECRET'>
  logger: Logger
  /** Receipts are e-mailed through it when present. */
  outbox?: EmailOutbox
}

export interface CheckoutUrls {
  /** Where the provider sends the customer after paying; `{CHECKOUT_SESSION_ID}` is filled in by the provider. */
  successUrl: string
  cancelUrl: string
  /** The customer's request, so the audit log records where the payment page was opened from. */
  req?: Request | null
}

type Context = NonNullable<Awaited<ReturnType<ReturnType<typeof createDepositsRepo>['confirmationContext']>>>

/** A signed event about a payment page or payment this database never asked for. */
class UnknownPayment extends Error {}

const Uuid = z.uuid()

export function toDeposit(row: DepositRow): Deposit {
  return {
    id: row.id,
    confirmationId: row.confirmationId,
    status: row.status,
    amountMinor: row.amountMinor,
    currency: row.currency,
    paidAt: row.paidAt?.toISOString() ?? null,
    refundedMinor: row.refundedMinor,
    refundedAt: row.refundedAt?.toISOString() ?? null,
  }
}

const escapeHtml = (text: string) => text.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`)

/** Stripe rejects addresses without a dot in the domain; a customer record may hold one, so it is then left for the page to ask. */
const usableEmail = (email: string | null) => (email && /^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(email) ? email : undefined)

function describe(ctx: Context) {
  const snapshot = ctx.version.snapshot
  const reference = snapshot.reference || estimateReference(ctx.estimate.number)
  const vehicle = `${snapshot.vehicle.make} ${snapshot.vehicle.model} (${snapshot.vehicle.registration})`
  return { reference, version: ctx.version.version, vehicle, title: `Deposit for estimate ${reference} v${ctx.version.version}` }
}

/** Card deposits through Stripe Checkout; a deposit becomes paid only through the provider's signed webhook. */
export function createDepositsService(deps: DepositsDeps) {
  const { db, stripe, env, logger, outbox } = deps
  const repo = createDepositsRepo(db)

  /** Provider refusals and outages become a 502 the browser can show; the details stay in the log. */
  function refusal(what: string, err: unknown): unknown {
    if (!(err instanceof Stripe.errors.StripeError)) return err
    logger.error(
      { err: { type: err.type, code: err.code, message: err.message, requestId: err.requestId, statusCode: err.statusCode } },
      `card payment provider refused to ${what}`,
    )
    return new AppError(502, 'payment_provider_error', 'The card payment service could not take the request. Please try again in a moment.')
  }

  async function provider<T>(what: string, call: () => Promise<T>): Promise<T> {
    try {
      return await call()
    } catch (err) {
      throw refusal(what, err)
    }
  }

  async function mustContext(q: Tx, confirmationId: string): Promise<Context> {
    const ctx = await repo.confirmationContext(q, confirmationId)
    if (!ctx) throw new NotFoundError('No such confirmed estimate.')
    return ctx
  }

  async function sendReceipt(
    tx: Tx,
    ctx: Context,
    kind: 'deposit.paid' | 'deposit.refunded',
    amountMinor: number,
    currency: string,
    log: Logger,
  ) {
    if (!outbox) return
    const to = ctx.customer.email
    if (!to) {
      log.info({ confirmationId: ctx.confirmation.id }, `no e-mail address for the customer; ${kind} receipt not sent`)
      return
    }
    const { reference, version, vehicle } = describe(ctx)
    const amount = formatMoney(amountMinor, currency)
    const lines =
      kind === 'deposit.paid'
        ? [
            `Thank you: ${ctx.workshop.name} has received your deposit of ${amount} for estimate ${reference} (version ${version}) for your ${vehicle}.`,
            'Keep this e-mail as your receipt.',
          ]
        : [
            `${ctx.workshop.name} has refunded your deposit of ${amount} for estimate ${reference} (version ${version}) for your ${vehicle}.`,
            'A card refund can take several working days to reach your account.',
          ]
    const greeting = `Dear ${ctx.customer.name},`
    const signOff = ctx.workshop.name
    await outbox.queue(
      {
        workshopId: ctx.workshop.id,
        estimateId: ctx.estimate.id,
        kind,
        to,
        subject: kind === 'deposit.paid' ? `Deposit received for estimate ${reference}` : `Deposit refunded for estimate ${reference}`,
        text: [greeting, '', ...lines.flatMap((l) => [l, '']), signOff].join('\n'),
        html: [greeting, ...lines, signOff].map((l) => `<p>${escapeHtml(l)}</p>`).join('\n'),
        replyTo: ctx.workshop.email,
        fromName: ctx.workshop.name,
      },
      tx,
    )
  }

  async function newSession(ctx: Context, deposit: DepositRow, attempt: number, urls: CheckoutUrls) {
    const { title, vehicle } = describe(ctx)
    const metadata = {
      depositId: deposit.id,
      confirmationId: ctx.confirmation.id,
      workshopId: ctx.workshop.id,
      estimateId: ctx.estimate.id,
      attempt: String(attempt),
      // Shown as the merchant on the local payments fake's page; Stripe keeps it as plain metadata.
      merchant_name: ctx.workshop.name.slice(0, 500),
    }
    return provider('open a payment page', () =>
      stripe.checkout.sessions.create(
        {
          mode: 'payment',
          line_items: [
            {
              quantity: 1,
              price_data: {
                currency: deposit.currency.toLowerCase(),
                unit_amount: deposit.amountMinor,
                product_data: { name: title, description: vehicle },
              },
            },
          ],
          customer_email: usableEmail(ctx.customer.email),
          client_reference_id: ctx.confirmation.id,
          metadata,
          payment_intent_data: { description: title, metadata },
          submit_type: 'pay',
          success_url: urls.successUrl,
          cancel_url: urls.cancelUrl,
        },
        // The same attempt always sends the same key, so a retry after a lost answer or a rolled-back
        // transaction gets the page already made instead of a second one.
        { idempotencyKey: `deposit-${ctx.confirmation.id}-${attempt}` },
      ),
    )
  }

  /** The provider's page, or null when it no longer knows it (the local fake forgets everything when restarted). */
  async function findSession(sessionId: string): Promise<Stripe.Checkout.Session | null> {
    try {
      return await stripe.checkout.sessions.retrieve(sessionId)
    } catch (err) {
      if (err instanceof Stripe.errors.StripeInvalidRequestError && err.statusCode === 404) return null
      throw refusal('look up a payment page', err)
    }
  }

  async function stillProcessing(session: Stripe.Checkout.Session): Promise<boolean> {
    const intent = session.payment_intent
    if (!intent) return false
    const id = typeof intent === 'string' ? intent : intent.id
    const current = await provider('look up a payment', () => stripe.paymentIntents.retrieve(id))
    return current.status === 'processing'
  }

  /** The attempt number a page was made for (kept in its metadata); without one it counts as the first. */
  const attemptOf = (session: Stripe.Checkout.Session) => {
    const n = Number(session.metadata?.attempt)
    return Number.isInteger(n) && n > 0 ? n : 1
  }

  /** The deposit a provider session belongs to: by its stored id, else (an older page of the same deposit) by its metadata. */
  async function depositForSession(tx: Tx, session: Stripe.Checkout.Session) {
    const current = await repo.lockBySession(tx, session.id)
    if (current) return { deposit: current, current: true }
    const depositId = session.metadata?.depositId
    const older = depositId && Uuid.safeParse(depositId).success ? await repo.lockById(tx, depositId) : undefined
    if (older && older.confirmationId === session.metadata?.confirmationId) return { deposit: older, current: false }
    throw new UnknownPayment(`checkout session ${session.id}`)
  }

  async function sessionCompleted(
    tx: Tx,
    event: Stripe.CheckoutSessionCompletedEvent | Stripe.CheckoutSessionAsyncPaymentSucceededEvent,
    req: Request | null,
    log: Logger,
  ) {
    const session = event.data.object
    const { deposit, current } = await depositForSession(tx, session)
    if (session.payment_status !== 'paid') return 'not_paid'
    const paymentIntentId = typeof session.payment_intent === 'string' ? session.payment_intent : (session.payment_intent?.id ?? null)
    if (deposit.status !== 'awaiting_payment') {
      if (deposit.paymentIntentId !== paymentIntentId) {
        // Two payments for one deposit: nothing here can undo it, so staff must refund one by hand.
        log.error(
          { depositId: deposit.id, sessionId: session.id, paymentIntentId, kept: deposit.paymentIntentId },
          'a second payment arrived for a deposit already paid',
        )
      }
      return 'already_paid'
    }
    if (session.amount_total !== deposit.amountMinor || session.currency?.toUpperCase() !== deposit.currency) {
      log.error(
        {
          depositId: deposit.id,
          sessionId: session.id,
          charged: session.amount_total,
          currency: session.currency,
          expected: deposit.amountMinor,
        },
        'deposit paid with an amount other than the one asked for',
      )
    }
    if (!current) log.warn({ depositId: deposit.id, sessionId: session.id }, 'deposit paid through an earlier payment page')
    const paid = await repo.update(tx, deposit.id, { status: 'paid', paidAt: new Date(event.created * 1000), paymentIntentId })
    const ctx = await mustContext(tx, deposit.confirmationId)
    const amount = formatMoney(paid.amountMinor, paid.currency)
    await recordAudit(tx, req ? auditContextOf(req) : null, {
      action: 'deposit.paid',
      workshopId: ctx.workshop.id,
      actor: { kind: 'system', name: 'Card payment' },
      subject: { type: 'estimate', id: ctx.estimate.id },
      details: {
        depositId: paid.id,
        amountMinor: paid.amountMinor,
        currency: paid.currency,
        paymentIntentId,
        sessionId: session.id,
        eventId: event.id,
      },
    })
    await publishLive(tx, {
      type: 'estimate.deposit_paid',
      workshopId: ctx.workshop.id,
      estimateId: ctx.estimate.id,
      status: 'deposit_paid',
      summary: `${ctx.customer.name} paid the deposit of ${amount}`.slice(0, 300),
    })
    await sendReceipt(tx, ctx, 'deposit.paid', paid.amountMinor, paid.currency, log)
    // With the deposit in, the approved work can start.
    await repo.setJobStatus(tx, ctx.confirmation.workshopId, ctx.estimate.jobId, ['waiting_for_customer'], 'in_work')
    return 'paid'
  }

  async function paymentNotTaken(tx: Tx, deposit: DepositRow, summary: string) {
    if (deposit.status !== 'awaiting_payment') return
    const ctx = await mustContext(tx, deposit.confirmationId)
    await publishLive(tx, { type: 'estimate.changed', workshopId: ctx.workshop.id, estimateId: ctx.estimate.id, summary })
  }

  async function handle(tx: Tx, event: Stripe.Event, req: Request | null, log: Logger): Promise<string> {
    if (!(await repo.recordEvent(tx, event.id, event.type))) return 'duplicate'
    switch (event.type) {
      case 'checkout.session.completed':
      case 'checkout.session.async_payment_succeeded':
        return sessionCompleted(tx, event, req, log)
      case 'checkout.session.expired': {
        const { deposit, current } = await depositForSession(tx, event.data.object)
        if (current) await paymentNotTaken(tx, deposit, 'The deposit payment page expired without a payment')
        return 'expired'
      }
      case 'payment_intent.payment_failed': {
        const depositId = event.data.object.metadata?.depositId
        const deposit = depositId && Uuid.safeParse(depositId).success ? await repo.lockById(tx, depositId) : undefined
        if (!deposit) throw new UnknownPayment(`payment intent ${event.data.object.id}`)
        await paymentNotTaken(tx, deposit, 'A card payment for the deposit was declined')
        return 'failed'
      }
      default:
        return 'ignored'
    }
  }

  return {
    /**
     * The payment page for a confirmation's deposit: the open one if there is one, else a new one.
     * The deposit row stays locked while the provider is asked, so two clicks make one page.
     */
    async startCheckout(confirmationId: string, urls: CheckoutUrls): Promise<StartCheckoutResult> {
      return repo.transaction(async (tx) => {
        const ctx = await mustContext(tx, confirmationId)
        if (ctx.estimate.withdrawnAt)
          throw new ConflictError('This estimate has been withdrawn, so no deposit can be paid on it.', 'estimate_withdrawn')
        if (ctx.confirmation.depositMinor <= 0) throw new ConflictError('No deposit is due on this estimate.', 'no_deposit_due')
        await repo.ensureDeposit(tx, {
          workshopId: ctx.workshop.id,
          confirmationId,
          amountMinor: ctx.confirmation.depositMinor,
          currency: ctx.version.snapshot.currency.toUpperCase(),
        })
        const deposit = await repo.lockByConfirmation(tx, confirmationId)
        if (!deposit) throw new Error(`deposit for confirmation ${confirmationId} missing after insert`)
        if (deposit.status !== 'awaiting_payment') throw new ConflictError('The deposit has already been paid.', 'already_paid')

        let attempt = 1
        const previous = deposit.checkoutSessionId ? await findSession(deposit.checkoutSessionId) : null
        if (deposit.checkoutSessionId && !previous)
          logger.warn(
            { depositId: deposit.id, sessionId: deposit.checkoutSessionId },
            'the payment provider no longer knows the last payment page; making a new one',
          )
        if (previous) {
          if (previous.status === 'open' && previous.url && previous.expires_at * 1000 > Date.now())
            return { url: previous.url, sessionId: previous.id }
          if (previous.status === 'complete' && previous.payment_status === 'paid') {
            throw new ConflictError('The deposit has been paid; its confirmation is on its way.', 'already_paid')
          }
          // A payment method that settles later (not a card) leaves a completed page unpaid while the money is on its way.
          if (previous.status === 'complete' && (await stillProcessing(previous))) {
            throw new ConflictError('Your payment is still being processed. We will e-mail you when it has arrived.', 'payment_processing')
          }
          attempt = attemptOf(previous) + 1
        }

        const session = await newSession(ctx, deposit, attempt, urls)
        if (!session.url) throw new Error(`checkout session ${session.id} came back without a url (status ${session.status})`)
        await repo.update(tx, deposit.id, { checkoutSessionId: session.id })
        await recordAudit(tx, urls.req ? auditContextOf(urls.req) : null, {
          action: 'deposit.checkout_started',
          workshopId: ctx.workshop.id,
          actor: { kind: 'customer', id: ctx.customer.id, name: ctx.customer.name },
          subject: { type: 'estimate', id: ctx.estimate.id },
          details: { depositId: deposit.id, amountMinor: deposit.amountMinor, currency: deposit.currency, sessionId: session.id, attempt },
        })
        return { url: session.url, sessionId: session.id }
      })
    },

    /** Checks the `Stripe-Signature` header against the exact bytes received (default 300 s tolerance). */
    verifyEvent(rawBody: unknown, signature: string | undefined): Stripe.Event {
      if (!Buffer.isBuffer(rawBody) || !signature) {
        throw new AppError(400, 'bad_signature', 'Expected a signed JSON event with a Stripe-Signature header.')
      }
      try {
        return stripe.webhooks.constructEvent(rawBody, signature, env.STRIPE_WEBHOOK_SECRET)
      } catch (err) {
        if (err instanceof Stripe.errors.StripeSignatureVerificationError) {
          throw new AppError(400, 'bad_signature', 'The event signature does not match.')
        }
        throw err
      }
    },

    /**
     * Applies a verified event once: its id is recorded in the same transaction as its effect, so a
     * repeated delivery (or one racing the first) changes nothing. An event about a payment this
     * database never asked for changes nothing either, and is answered 2xx so it is not re-sent.
     */
    async handleEvent(event: Stripe.Event, req: Request | null = null): Promise<string> {
      const log = req?.log ?? logger
      try {
        const outcome = await repo.transaction((tx) => handle(tx, event, req, log))
        log.info({ eventId: event.id, type: event.type, outcome }, 'payment event handled')
        return outcome
      } catch (err) {
        if (!(err instanceof UnknownPayment)) throw err
        log.warn({ eventId: event.id, type: event.type, about: err.message }, 'payment event for an unknown payment ignored')
        return 'unknown'
      }
    },

    /** Refunds the paid deposit of the estimate's newest confirmation, in full. */
    async refund(req: Request | null, me: StaffPrincipal, estimateId: string): Promise<Deposit> {
      const target = await repo.latestConfirmation(me.workshop.id, estimateId)
      if (!target) throw new NotFoundError('No such estimate in this workshop.')
      const { confirmationId } = target
      if (!confirmationId) throw new ConflictError('There is no paid deposit to refund on this estimate.', 'not_paid')
      return repo.transaction(async (tx) => {
        const deposit = await repo.lockByConfirmation(tx, confirmationId)
        if (deposit?.status === 'refunded') throw new ConflictError('The deposit has already been refunded.', 'already_refunded')
        if (deposit?.status !== 'paid' || !deposit.paymentIntentId)
          throw new ConflictError('There is no paid deposit to refund on this estimate.', 'not_paid')
        const paymentIntent = deposit.paymentIntentId
        const ctx = await mustContext(tx, confirmationId)
        const refund = await provider('refund a deposit', () =>
          stripe.refunds.create(
            {
              payment_intent: paymentIntent,
              metadata: { depositId: deposit.id, confirmationId, estimateId: ctx.estimate.id, workshopId: ctx.workshop.id },
            },
            // One refund per deposit, however often the button is pressed or the request retried.
            { idempotencyKey: `refund-${deposit.id}` },
          ),
        )
        const row = await repo.update(tx, deposit.id, {
          status: 'refunded',
          refundId: refund.id,
          refundedMinor: refund.amount,
          refundedAt: new Date(),
        })
        await recordAudit(tx, req ? auditContextOf(req) : null, {
          action: 'deposit.refunded',
          workshopId: ctx.workshop.id,
          subject: { type: 'estimate', id: ctx.estimate.id },
          details: {
            depositId: row.id,
            amountMinor: refund.amount,
            currency: row.currency,
            refundId: refund.id,
            paymentIntentId: paymentIntent,
          },
        })
        await publishLive(tx, {
          type: 'estimate.deposit_refunded',
          workshopId: ctx.workshop.id,
          estimateId: ctx.estimate.id,
          summary: `${me.name} refunded the deposit of ${formatMoney(refund.amount, row.currency)}`.slice(0, 300),
        })
        await sendReceipt(tx, ctx, 'deposit.refunded', refund.amount, row.currency, req?.log ?? logger)
        return toDeposit(row)
      })
    },

    async getDepositForConfirmation(confirmationId: string): Promise<Deposit | null> {
      const row = await repo.byConfirmation(confirmationId)
      return row ? toDeposit(row) : null
    },

    /**
     * For the page the customer returns to: `confirming` while the provider reports the page paid
     * but its webhook has not yet marked the deposit paid here.
     */
    async getCheckoutStatus(sessionId: string): Promise<CheckoutStatus> {
      const row = await repo.bySession(sessionId)
      if (!row) throw new NotFoundError('No such payment.')
      const deposit = toDeposit(row)
      if (row.status !== 'awaiting_payment') return { state: row.status, deposit }
      const session = await findSession(sessionId)
      if (session?.status === 'complete' && session.payment_status === 'paid') return { state: 'confirming', deposit }
      return { state: session?.status === 'open' ? 'open' : 'expired', deposit }
    },
  }
}

export type DepositsService = ReturnType<typeof createDepositsService>
