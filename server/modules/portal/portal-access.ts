import type { AuditEntry } from '../../lib/audit'
import { NotFoundError } from '../../lib/errors'
import { estimateLinkUrl } from './estimate-links'
import type { PortalRepo, Tx, VersionRow } from './portal.repo'
import type { AuditAction } from '../../../shared/schemas/audit'

/** What leads a customer to an estimate: its addresses, a fresh link, and the answer when it is not theirs. */

/** The audit entry of something done to one estimate of the caller's workshop. */
export function estimateEntry(workshopId: string, estimateId: string, action: AuditAction, details: Record<string, unknown>): AuditEntry {
  return { action, workshopId, subject: { type: 'estimate', id: estimateId }, details }
}

/** The same, about one sent version: its reference and number lead the details. */
export function versionEntry(v: VersionRow, action: AuditAction, details: Record<string, unknown>): AuditEntry {
  return estimateEntry(v.workshopId, v.estimateId, action, { reference: v.snapshot.reference, version: v.version, ...details })
}

/** Another customer's estimate is simply not there. */
export const notYours = () => new NotFoundError('No such estimate.')

export function portalUrls(publicBaseUrl: string) {
  const base = publicBaseUrl.replace(/\/$/, '')
  return {
    /** The advisor's page of the estimate, for e-mails to the workshop. */
    staffEstimate: (estimateId: string) => `${base}/estimates/${estimateId}`,
    /** The customer's page once signed in. */
    portalEstimate: (estimateId: string) => `${base}/portal/estimates/${estimateId}`,
    link: (token: string) => estimateLinkUrl(base, token),
  }
}

export type PortalUrls = ReturnType<typeof portalUrls>

/** A fresh link to the version when it can still be decided on; null when there is nothing to open. */
export async function freshLink(
  repo: Pick<PortalRepo, 'linkExpiry' | 'issueLink'>,
  urls: PortalUrls,
  tx: Tx,
  to: { workshopId: string; estimate: { withdrawnAt: Date | null }; version: VersionRow; customerId: string },
): Promise<string | null> {
  const { workshopId, estimate, version, customerId } = to
  if (estimate.withdrawnAt || version.expired || version.supersededAt) return null
  const expiresAt = await repo.linkExpiry(tx, workshopId, version.id)
  const token = await repo.issueLink(tx, { workshopId, versionId: version.id, customerId, expiresAt })
  return urls.link(token)
}
