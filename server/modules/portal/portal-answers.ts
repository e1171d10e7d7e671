import type { ConfirmedRow, QuestionRow, VersionRow } from './portal.repo'
import { iso } from '../../../shared/dates'
import { sentEstimateStatusOf } from '../../../shared/schemas/estimates'
import type { PortalConfirmation, PortalDeposit, PortalEstimateStatus, PortalQuestion, StaffQuestion } from '../../../shared/schemas/portal'

/** How the portal's stored rows become the shapes of its API answers. */

export function statusOf(
  estimate: { withdrawnAt: Date | null },
  v: Pick<VersionRow, 'confirmedAt' | 'expired' | 'openedAt'>,
  depositStatus: 'awaiting_payment' | 'paid' | 'refunded' | null | undefined,
): PortalEstimateStatus {
  return sentEstimateStatusOf({
    withdrawn: estimate.withdrawnAt !== null,
    depositStatus: depositStatus ?? null,
    confirmed: v.confirmedAt !== null,
    expired: v.expired,
    opened: v.openedAt !== null,
  })
}

export function depositOf(confirmed: ConfirmedRow | undefined, currency: string): PortalDeposit {
  if (!confirmed || confirmed.confirmation.depositMinor === 0)
    return { status: 'not_due', amountMinor: 0, currency, paidAt: null, refundedMinor: null, refundedAt: null }
  const d = confirmed.deposit
  return {
    status: d?.status ?? 'awaiting_payment',
    amountMinor: d?.amountMinor ?? confirmed.confirmation.depositMinor,
    currency: d?.currency ?? currency,
    paidAt: iso(d?.paidAt),
    refundedMinor: d?.refundedMinor ?? null,
    refundedAt: iso(d?.refundedAt),
  }
}

export function confirmationOf(c: ConfirmedRow['confirmation']): PortalConfirmation {
  return {
    id: c.id,
    confirmedAt: c.confirmedAt.toISOString(),
    versionHash: c.versionHash,
    decisions: c.decisions,
    consents: c.consents,
    approvedGross: c.approvedGross,
    depositMinor: c.depositMinor,
  }
}

export function questionOf(row: QuestionRow): PortalQuestion {
  const q = row.question
  return {
    id: q.id,
    itemId: q.itemId,
    version: row.version,
    question: q.question,
    answer: q.answer,
    askedAt: q.askedAt.toISOString(),
    answeredAt: iso(q.answeredAt),
  }
}

/** The advisor's view of a question: the item's title and number from the version it was asked on. */
export function staffQuestionOf(row: QuestionRow, versions: VersionRow[]): StaffQuestion {
  const item = versions.find((v) => v.version === row.version)?.snapshot.items.find((i) => i.id === row.question.itemId)
  return {
    ...questionOf(row),
    itemTitle: item?.title ?? row.question.itemId,
    itemNumber: item?.number ?? 1,
    customerName: row.customerName,
    answeredBy: row.question.answeredBy && row.answeredByName ? { id: row.question.answeredBy, name: row.answeredByName } : null,
  }
}
