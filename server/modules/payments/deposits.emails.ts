import type { Logger } from 'pino'
import { type EmailContent, renderEmail } from '../../lib/email-layout'
import type { EmailOutbox } from '../email/outbox'
import { depositWords } from './deposit-facts'
import type { ConfirmationDetails, Tx } from './deposits.repo'
import { formatMoney } from '../../../shared/money'

export type ReceiptKind = 'deposit.paid' | 'deposit.refunded'

/** The customer's receipt for a deposit paid or refunded. */
export function receiptEmail(details: ConfirmationDetails, kind: ReceiptKind, amountMinor: number, currency: string): EmailContent {
  const { reference, version, vehicle } = depositWords(details)
  const amount = formatMoney(amountMinor, currency)
  const workshop = details.workshop.name
  const lines =
    kind === 'deposit.paid'
      ? [
          `Thank you: ${workshop} has received your deposit of ${amount} for estimate ${reference} (version ${version}) for your ${vehicle}.`,
          'Keep this e-mail as your receipt.',
        ]
      : [
          `${workshop} has refunded your deposit of ${amount} for estimate ${reference} (version ${version}) for your ${vehicle}.`,
          'A card refund can take several working days to reach your account.',
        ]
  return renderEmail(
    kind === 'deposit.paid' ? `Deposit received for estimate ${reference}` : `Deposit refunded for estimate ${reference}`,
    [{ text: `Dear ${details.customer.name},` }, ...lines.map((text) => ({ text })), { text: workshop }],
  )
}

/** Queues the receipt in the caller's transaction; a customer without an address gets none, and the log says so. */
export async function queueReceipt(
  outbox: EmailOutbox,
  tx: Tx,
  details: ConfirmationDetails,
  receipt: { kind: ReceiptKind; amountMinor: number; currency: string },
  log: Logger,
) {
  const to = details.customer.email
  if (!to) {
    log.info({ confirmationId: details.confirmation.id }, `no e-mail address for the customer; ${receipt.kind} receipt not sent`)
    return
  }
  const mail = receiptEmail(details, receipt.kind, receipt.amountMinor, receipt.currency)
  await outbox.queue(
    {
      workshopId: details.workshop.id,
      estimateId: details.estimate.id,
      kind: receipt.kind,
      to,
      ...mail,
      replyTo: details.workshop.email,
      fromName: details.workshop.name,
    },
    tx,
  )
}
