import type { Logger } from 'pino'
import type Stripe from 'stripe'
import type { AuditContext } from '../../lib/audit'
import { ConflictError, NotFoundError } from '../../lib/errors'
import { confirmationDetails, depositWords, toDeposit } from './deposit-facts'
import type { ConfirmationDetails, DepositRow, DepositsRepo } from './deposits.repo'
import { paymentProvider } from './payment-provider'
import type { CheckoutStatus, Deposit, StartCheckoutResult } from '../../../shared/schemas/payments'

export interface DepositCheckoutDeps {
  repo: Pick<
    DepositsRepo,
    | 'transaction'
    | 'confirmationDetails'
    | 'ensureDeposit'
    | 'lockByConfirmation'
    | 'update'
    | 'byConfirmation'
    | 'bySession'
    | 'recordAudit'
  >
  stripe: Stripe
  logger: Logger
}

export interface CheckoutUrls {
  /** Where the provider sends the customer after paying; `{CHECKOUT_SESSION_ID}` is filled in by the provider. */
  successUrl: string
  cancelUrl: string
}

/** Stripe rejects addresses without a dot in the domain; a customer record may hold one, so it is then left for the page to ask. */
const usableEmail = (email: string | null) => (email && /^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(email) ? email : undefined)

/** The attempt number a page was made for (kept in its metadata); without one it counts as the first. */
const attemptOf = (session: Stripe.Checkout.Session) => {
  const n = Number(session.metadata?.attempt)
  return Number.isInteger(n) && n > 0 ? n : 1
}

/** The provider's payment page for a deposit, and what became of it; the deposit becomes paid only through the webhook. */
export function createDepositCheckoutService(deps: DepositCheckoutDeps) {
  const { repo, logger } = deps
  const provider = paymentProvider(deps.stripe, logger)

  async function newSession(details: ConfirmationDetails, deposit: DepositRow, attempt: number, urls: CheckoutUrls) {
    const { title, vehicle } = depositWords(details)
    const metadata = {
      depositId: deposit.id,
      confirmationId: details.confirmation.id,
      workshopId: details.workshop.id,
      estimateId: details.estimate.id,
      attempt: String(attempt),
      // Shown as the merchant on the local payments fake's page; Stripe keeps it as plain metadata.
      merchant_name: details.workshop.name.slice(0, 500),
    }
    return provider.call('open a payment page', (stripe) =>
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
          customer_email: usableEmail(details.customer.email),
          client_reference_id: details.confirmation.id,
          metadata,
          payment_intent_data: { description: title, metadata },
          submit_type: 'pay',
          success_url: urls.successUrl,
          cancel_url: urls.cancelUrl,
        },
        // The same attempt always sends the same key, so a retry after a lost answer or a rolled-back
        // transaction gets the page already made instead of a second one.
        { idempotencyKey: `deposit-${details.confirmation.id}-${attempt}` },
      ),
    )
  }

  async function stillProcessing(session: Stripe.Checkout.Session): Promise<boolean> {
    const intent = session.payment_intent
    if (!intent) return false
    const id = typeof intent === 'string' ? intent : intent.id
    const current = await provider.call('look up a payment', (stripe) => stripe.paymentIntents.retrieve(id))
    return current.status === 'processing'
  }

  return {
    /**
     * The payment page for a confirmation's deposit: the open one if there is one, else a new one.
     * The deposit row stays locked while the provider is asked, so two clicks make one page.
     */
    async startCheckout(ctx: AuditContext, confirmationId: string, urls: CheckoutUrls): Promise<StartCheckoutResult> {
      return repo.transaction(async (tx) => {
        const details = await confirmationDetails(repo, tx, confirmationId)
        if (details.estimate.withdrawnAt)
          throw new ConflictError('This estimate has been withdrawn, so no deposit can be paid on it.', 'estimate_withdrawn')
        if (details.confirmation.depositMinor <= 0) throw new ConflictError('No deposit is due on this estimate.', 'no_deposit_due')
        await repo.ensureDeposit(tx, {
          workshopId: details.workshop.id,
          confirmationId,
          amountMinor: details.confirmation.depositMinor,
          currency: details.version.snapshot.currency.toUpperCase(),
        })
        const deposit = await repo.lockByConfirmation(tx, confirmationId)
        if (!deposit) throw new Error(`deposit for confirmation ${confirmationId} missing after insert`)
        if (deposit.status !== 'awaiting_payment') throw new ConflictError('The deposit has already been paid.', 'already_paid')

        let attempt = 1
        const previous = deposit.checkoutSessionId ? await provider.findSession(deposit.checkoutSessionId) : null
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

        const session = await newSession(details, deposit, attempt, urls)
        if (!session.url) throw new Error(`checkout session ${session.id} came back without a url (status ${session.status})`)
        await repo.update(tx, deposit.id, { checkoutSessionId: session.id })
        await repo.recordAudit(tx, ctx, {
          action: 'deposit.checkout_started',
          workshopId: details.workshop.id,
          actor: { kind: 'customer', id: details.customer.id, name: details.customer.name },
          subject: { type: 'estimate', id: details.estimate.id },
          details: { depositId: deposit.id, amountMinor: deposit.amountMinor, currency: deposit.currency, sessionId: session.id, attempt },
        })
        return { url: session.url, sessionId: session.id }
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
      const session = await provider.findSession(sessionId)
      if (session?.status === 'complete' && session.payment_status === 'paid') return { state: 'confirming', deposit }
      return { state: session?.status === 'open' ? 'open' : 'expired', deposit }
    },
  }
}

export type DepositCheckoutService = ReturnType<typeof createDepositCheckoutService>
