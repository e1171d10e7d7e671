import type { Logger } from 'pino'
import Stripe from 'stripe'
import { z } from 'zod'
import type { Env } from '../../env'
import type { AuditContext } from '../../lib/audit'
import { BadRequestError } from '../../lib/errors'
import type { EmailOutbox } from '../email/outbox'
import { confirmationDetails } from './deposit-facts'
import { queueReceipt } from './deposits.emails'
import type { DepositRow, DepositsRepo, Tx } from './deposits.repo'
import { formatMoney } from '../../../shared/money'

export interface DepositWebhookDeps {
  repo: Pick<
    DepositsRepo,
    | 'transaction'
    | 'recordEvent'
    | 'lockBySession'
    | 'lockById'
    | 'update'
    | 'confirmationDetails'
    | 'setJobStatus'
    | 'recordAudit'
    | 'publishLive'
  >
  /** Only the signature check is used: the event itself says everything. */
  stripe: Pick<Stripe, 'webhooks'>
  env: Pick<Env, 'STRIPE_WEBHOOK_SECRET'>
  logger: Logger
  outbox: EmailOutbox
}

/** A signed event about a payment page or payment this database never asked for. */
class UnknownPayment extends Error {}

const Uuid = z.uuid()

/** The provider's signed word on a payment: the only way a deposit becomes paid. */
export function createDepositWebhookService(deps: DepositWebhookDeps) {
  const { repo, stripe, env, logger, outbox } = deps

  /** Checks the `Stripe-Signature` header against the exact bytes received (default 300 s tolerance). */
  function verified(rawBody: Buffer | undefined, signature: string | undefined): Stripe.Event {
    if (!rawBody || !signature) throw new BadRequestError('Expected a signed JSON event with a Stripe-Signature header.', 'bad_signature')
    try {
      return stripe.webhooks.constructEvent(rawBody, signature, env.STRIPE_WEBHOOK_SECRET)
    } catch (err) {
      if (err instanceof Stripe.errors.StripeSignatureVerificationError)
        throw new BadRequestError('The event signature does not match.', 'bad_signature')
      throw err
    }
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
    ctx: AuditContext,
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
    const details = await confirmationDetails(repo, tx, deposit.confirmationId)
    const amount = formatMoney(paid.amountMinor, paid.currency)
    await repo.recordAudit(tx, ctx, {
      action: 'deposit.paid',
      workshopId: details.workshop.id,
      actor: { kind: 'system', name: 'Card payment' },
      subject: { type: 'estimate', id: details.estimate.id },
      details: {
        depositId: paid.id,
        amountMinor: paid.amountMinor,
        currency: paid.currency,
        paymentIntentId,
        sessionId: session.id,
        eventId: event.id,
      },
    })
    await repo.publishLive(tx, {
      type: 'estimate.deposit_paid',
      workshopId: details.workshop.id,
      estimateId: details.estimate.id,
      status: 'deposit_paid',
      summary: `${details.customer.name} paid the deposit of ${amount}`.slice(0, 300),
    })
    await queueReceipt(outbox, tx, details, { kind: 'deposit.paid', amountMinor: paid.amountMinor, currency: paid.currency }, log)
    // With the deposit in, the approved work can start.
    await repo.setJobStatus(tx, details.confirmation.workshopId, details.estimate.jobId, ['waiting_for_customer'], 'in_work')
    return 'paid'
  }

  async function paymentNotTaken(tx: Tx, deposit: DepositRow, summary: string) {
    if (deposit.status !== 'awaiting_payment') return
    const details = await confirmationDetails(repo, tx, deposit.confirmationId)
    await repo.publishLive(tx, { type: 'estimate.changed', workshopId: details.workshop.id, estimateId: details.estimate.id, summary })
  }

  async function apply(tx: Tx, event: Stripe.Event, ctx: AuditContext, log: Logger): Promise<string> {
    if (!(await repo.recordEvent(tx, event.id, event.type))) return 'duplicate'
    switch (event.type) {
      case 'checkout.session.completed':
      case 'checkout.session.async_payment_succeeded':
        return sessionCompleted(tx, event, ctx, log)
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
     * Verifies an event on the exact bytes received, then applies it once: its id is recorded in the
     * same transaction as its effect, so a repeated delivery (or one racing the first) changes nothing.
     * An event about a payment this database never asked for changes nothing either, and is answered
     * 2xx so it is not re-sent. Answers what became of the event.
     */
    async handleWebhook(rawBody: Buffer | undefined, signature: string | undefined, ctx: AuditContext): Promise<string> {
      const event = verified(rawBody, signature)
      const log = ctx.requestId ? logger.child({ reqId: ctx.requestId }) : logger
      try {
        const outcome = await repo.transaction((tx) => apply(tx, event, ctx, log))
        log.info({ eventId: event.id, type: event.type, outcome }, 'payment event handled')
        return outcome
      } catch (err) {
        if (!(err instanceof UnknownPayment)) throw err
        log.warn({ eventId: event.id, type: event.type, about: err.message }, 'payment event for an unknown payment ignored')
        return 'unknown'
      }
    },
  }
}

export type DepositWebhookService = ReturnType<typeof createDepositWebhookService>
