import type { Logger } from 'pino'
import type Stripe from 'stripe'
import type { AuditContext } from '../../lib/audit'
import { ConflictError, NotFoundError } from '../../lib/errors'
import type { EmailOutbox } from '../email/outbox'
import { confirmationDetails, toDeposit } from './deposit-facts'
import { queueReceipt } from './deposits.emails'
import type { DepositsRepo } from './deposits.repo'
import { paymentProvider } from './payment-provider'
import { formatMoney } from '../../../shared/money'
import type { StaffPrincipal } from '../../../shared/schemas/auth'
import type { Deposit } from '../../../shared/schemas/payments'

export interface DepositRefundDeps {
  repo: Pick<
    DepositsRepo,
    'transaction' | 'latestConfirmation' | 'lockByConfirmation' | 'confirmationDetails' | 'update' | 'recordAudit' | 'publishLive'
  >
  stripe: Stripe
  logger: Logger
  outbox: EmailOutbox
}

/** A staff member giving a paid deposit back, in full, on the provider and in the record. */
export function createDepositRefundService(deps: DepositRefundDeps) {
  const { repo, logger, outbox } = deps
  const provider = paymentProvider(deps.stripe, logger)

  return {
    /** Refunds the paid deposit of the estimate's newest confirmation, in full. */
    async refund(ctx: AuditContext, me: StaffPrincipal, estimateId: string): Promise<Deposit> {
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
        const details = await confirmationDetails(repo, tx, confirmationId)
        const refund = await provider.call('refund a deposit', (stripe) =>
          stripe.refunds.create(
            {
              payment_intent: paymentIntent,
              metadata: { depositId: deposit.id, confirmationId, estimateId: details.estimate.id, workshopId: details.workshop.id },
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
        await repo.recordAudit(tx, ctx, {
          action: 'deposit.refunded',
          workshopId: details.workshop.id,
          subject: { type: 'estimate', id: details.estimate.id },
          details: {
            depositId: row.id,
            amountMinor: refund.amount,
            currency: row.currency,
            refundId: refund.id,
            paymentIntentId: paymentIntent,
          },
        })
        await repo.publishLive(tx, {
          type: 'estimate.deposit_refunded',
          workshopId: details.workshop.id,
          estimateId: details.estimate.id,
          summary: `${me.name} refunded the deposit of ${formatMoney(refund.amount, row.currency)}`.slice(0, 300),
        })
        const log = ctx.requestId ? logger.child({ reqId: ctx.requestId }) : logger
        await queueReceipt(outbox, tx, details, { kind: 'deposit.refunded', amountMinor: refund.amount, currency: row.currency }, log)
        return toDeposit(row)
      })
    },
  }
}

export type DepositRefundService = ReturnType<typeof createDepositRefundService>
