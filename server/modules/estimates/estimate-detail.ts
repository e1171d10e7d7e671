import { iso } from '../../../shared/dates'
import { calculateEstimate, safeCalculateEstimate } from '../../../shared/estimate'
import type { Decision, EstimateResult } from '../../../shared/estimate/contract'
import {
  draftToEngineInput,
  estimateReference,
  snapshotToEngineInput,
  type EstimateDetail,
  type EstimateDraft,
  type EstimateSummary,
} from '../../../shared/schemas/estimates'
import type { EstimateListRow, EstimateRow, EstimatesRepo, Queryable } from './estimates.repo'

export type EstimateDetailReads = Pick<EstimatesRepo, 'versions' | 'emails' | 'jobFindings' | 'status' | 'decisions'>

/** One line of the estimates list; a draft never sent is priced from the draft itself. */
export function estimateSummary(r: EstimateListRow): EstimateSummary {
  let proposed = r.proposed_gross
  if (proposed === null) {
    const result = safeCalculateEstimate(draftToEngineInput(r.draft as EstimateDraft, r.currency))
    proposed = result.success ? result.data.proposed.gross : 0
  }
  return {
    id: r.id,
    number: r.number,
    reference: estimateReference(r.number),
    status: r.status,
    jobId: r.job_id,
    customerName: r.customer_name,
    registration: r.registration,
    currency: r.currency,
    proposedGross: proposed,
    approvedGross: r.approved_gross,
    depositMinor: r.deposit_minor,
    hasUnsentChanges: r.has_unsent_changes,
    latestVersion: r.latest_version,
    updatedAt: new Date(r.updated_at).toISOString(),
  }
}

/** Everything the estimate screen shows: the draft, its versions, the customer's choices so far and the e-mails sent. */
export async function estimateDetail(
  repo: EstimateDetailReads,
  q: Queryable,
  row: EstimateRow,
  notices: string[] = [],
): Promise<EstimateDetail & { notices: string[] }> {
  const workshopId = row.estimate.workshopId
  const [versions, emails, findingRows, status] = await Promise.all([
    repo.versions(q, workshopId, row.estimate.id),
    repo.emails(q, workshopId, row.estimate.id),
    repo.jobFindings(q, workshopId, row.estimate.jobId),
    repo.status(q, workshopId, row.estimate.id),
  ])
  const latest = versions.at(-1)
  const decisions = latest ? await repo.decisions(q, workshopId, latest.version.id) : []
  let decided: EstimateResult | null = null
  if (latest) {
    const chosen: Record<string, Decision> =
      latest.confirmation?.decisions ?? Object.fromEntries(decisions.map((d) => [d.itemId, d.decision]))
    decided = latest.confirmation?.result ?? calculateEstimate(snapshotToEngineInput(latest.version.snapshot, chosen))
  }
  const usedBy = new Map<string, string[]>()
  for (const item of row.estimate.draft.items)
    if (item.findingId) usedBy.set(item.findingId, [...(usedBy.get(item.findingId) ?? []), item.id])
  return {
    id: row.estimate.id,
    number: row.estimate.number,
    reference: estimateReference(row.estimate.number),
    status: status ?? 'draft',
    currency: row.workshop.currency,
    job: { id: row.job.id, concern: row.job.concern, vehicleGroup: row.vehicle.vehicleGroup },
    customer: { id: row.customer.id, name: row.customer.name, email: row.customer.email },
    vehicle: { id: row.vehicle.id, registration: row.vehicle.registration, make: row.vehicle.make, model: row.vehicle.model },
    draft: row.estimate.draft,
    revision: row.estimate.revision,
    hasUnsentChanges: row.estimate.withdrawnAt === null && row.estimate.sentRevision !== row.estimate.revision,
    versions: versions.map((v) => ({
      id: v.version.id,
      version: v.version.version,
      hash: v.version.hash,
      sentAt: v.version.sentAt.toISOString(),
      expiresOn: v.version.expiresOn,
      supersededAt: iso(v.version.supersededAt),
      openedAt: iso(v.version.openedAt),
      confirmedAt: iso(v.version.confirmedAt),
      proposedGross: v.version.proposedGross,
    })),
    decisions: decisions.map((d) => ({ itemId: d.itemId, decision: d.decision, decidedAt: d.decidedAt.toISOString() })),
    decided,
    emails: emails.map((m) => ({
      id: m.id,
      kind: m.kind,
      to: m.to,
      subject: m.subject,
      status: m.status,
      attempts: m.attempts,
      lastError: m.lastError,
      queuedAt: m.queuedAt.toISOString(),
      sentAt: iso(m.sentAt),
    })),
    findings: findingRows
      .filter((f) => f.severity !== 'ok')
      .map((f) => ({
        id: f.id,
        title: f.title,
        severity: f.severity,
        position: f.position,
        measurement: f.measurement,
        usedByItemIds: usedBy.get(f.id) ?? [],
      })),
    withdrawnAt: iso(row.estimate.withdrawnAt),
    createdAt: row.estimate.createdAt.toISOString(),
    updatedAt: row.estimate.updatedAt.toISOString(),
    notices,
  }
}
