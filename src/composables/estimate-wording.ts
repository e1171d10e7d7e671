import type { Decision } from '@shared/estimate/contract'
import { dateTimeFormat } from '@shared/dates'
import type { EstimateDetail, EstimateVersionSummary, ItemDecision } from '@shared/schemas/estimates'

/** "2 Dec 14:03" by the workshop's clock: estimates live for weeks, so the year would only be noise. */
export function formatMoment(iso: string, timeZone: string): string {
  const parts = dateTimeFormat({
    day: 'numeric',
    month: 'short',
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
    timeZone,
  }).formatToParts(new Date(iso))
  const part = (type: Intl.DateTimeFormatPartTypes) => parts.find((p) => p.type === type)?.value ?? ''
  return `${part('day')} ${part('month')} ${part('hour')}:${part('minute')}`
}

/** "14:03" by the workshop's clock. */
export function formatClock(iso: string, timeZone: string): string {
  return dateTimeFormat({ hour: '2-digit', minute: '2-digit', hourCycle: 'h23', timeZone }).format(new Date(iso))
}

export function latestVersion(detail: Pick<EstimateDetail, 'versions'>): EstimateVersionSummary | null {
  return detail.versions.reduce<EstimateVersionSummary | null>(
    (latest, v) => (latest === null || v.version > latest.version ? v : latest),
    null,
  )
}

/**
 * "Version 2 — draft, not sent" while there is something the customer has not seen, else
 * "Version 2 sent 2 Dec 14:03". `localChanges` counts edits the server has not had yet.
 */
export function versionHeadline(
  detail: Pick<EstimateDetail, 'versions' | 'hasUnsentChanges'>,
  timeZone: string,
  localChanges = false,
): string {
  const latest = latestVersion(detail)
  if (!latest) return 'Version 1 — draft, not sent'
  if (detail.hasUnsentChanges || localChanges) return `Version ${latest.version + 1} — draft, not sent`
  return `Version ${latest.version} sent ${formatMoment(latest.sentAt, timeZone)}`
}

export const decisionLabels: Record<Decision, string> = {
  approved: 'Approved by customer',
  declined: 'Declined by customer',
  pending: 'Waiting for the customer',
}

/** "Approved by customer 14:03", or the bare label while the customer has not decided. */
export function decisionWording(decision: ItemDecision, timeZone: string): string {
  if (decision.decision === 'pending') return decisionLabels.pending
  return `${decisionLabels[decision.decision]} ${formatMoment(decision.decidedAt, timeZone)}`
}

/** The outbox's kind ("estimate_sent") as words for the list of e-mails. */
export function emailKindWording(kind: string): string {
  const words = kind.replace(/[._-]+/g, ' ').trim()
  return words ? words.charAt(0).toUpperCase() + words.slice(1) : 'E-mail'
}
