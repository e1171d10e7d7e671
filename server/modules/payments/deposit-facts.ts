import { NotFoundError } from '../../lib/errors'
import type { ConfirmationDetails, DepositRow, DepositsRepo, Tx } from './deposits.repo'
import { iso } from '../../../shared/dates'
import { estimateReference } from '../../../shared/schemas/estimates'
import type { Deposit } from '../../../shared/schemas/payments'

/** What the checkout, the webhook and the refund say alike about a deposit and its confirmation. */

export function toDeposit(row: DepositRow): Deposit {
  return {
    id: row.id,
    confirmationId: row.confirmationId,
    status: row.status,
    amountMinor: row.amountMinor,
    currency: row.currency,
    paidAt: iso(row.paidAt),
    refundedMinor: row.refundedMinor,
    refundedAt: iso(row.refundedAt),
  }
}

export async function confirmationDetails(repo: Pick<DepositsRepo, 'confirmationDetails'>, tx: Tx, confirmationId: string) {
  const details = await repo.confirmationDetails(tx, confirmationId)
  if (!details) throw new NotFoundError('No such confirmed estimate.')
  return details
}

/** The words a payment page and a receipt use for the estimate the deposit is for. */
export function depositWords(details: ConfirmationDetails) {
  const snapshot = details.version.snapshot
  const reference = snapshot.reference || estimateReference(details.estimate.number)
  const vehicle = `${snapshot.vehicle.make} ${snapshot.vehicle.model} (${snapshot.vehicle.registration})`
  return { reference, version: details.version.version, vehicle, title: `Deposit for estimate ${reference} v${details.version.version}` }
}
