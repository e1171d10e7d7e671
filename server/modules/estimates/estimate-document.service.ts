import { NotFoundError } from '../../lib/errors'
import { iso } from '../../../shared/dates'
import { calculateEstimate } from '../../../shared/estimate'
import { snapshotToEngineInput } from '../../../shared/schemas/estimates'
import type { EstimatesRepo } from './estimates.repo'
import { renderEstimatePdf } from './estimate-pdf'

/**
 * The PDF of one sent version as it stands: with the decision record once the customer has
 * confirmed, otherwise with every item proposed. The advisor's download, the customer's download
 * and the e-mail attachment all come from here, so they are the same document.
 */
export type EstimateDocumentRepo = Pick<EstimatesRepo, 'sentVersion'>

export function createEstimateDocumentService(deps: { repo: EstimateDocumentRepo }) {
  const { repo } = deps
  return {
    async renderVersion(workshopId: string, versionId: string): Promise<{ bytes: Uint8Array; filename: string }> {
      const row = await repo.sentVersion(workshopId, versionId)
      if (!row) throw new NotFoundError('No such estimate version.')
      const { version, confirmation, deposit } = row
      // Before confirmation the document shows the proposal: choices still being made are not a decision record.
      const result = confirmation?.result ?? calculateEstimate(snapshotToEngineInput(version.snapshot))
      const bytes = await renderEstimatePdf({
        snapshot: version.snapshot,
        result,
        sentAt: version.sentAt.toISOString(),
        timezone: row.timezone,
        hash: version.hash,
        decision: confirmation
          ? {
              confirmedAt: confirmation.confirmedAt.toISOString(),
              decisions: confirmation.decisions,
              consents: confirmation.consents,
              versionHash: confirmation.versionHash,
              ip: confirmation.ip,
              userAgent: confirmation.userAgent,
            }
          : null,
        deposit: deposit
          ? {
              amountMinor: deposit.amountMinor,
              status: deposit.status,
              paidAt: iso(deposit.paidAt),
              refundedMinor: deposit.refundedMinor,
            }
          : null,
      })
      return { bytes, filename: `${version.snapshot.reference}-v${version.version}.pdf` }
    },
  }
}

export type EstimateDocumentService = ReturnType<typeof createEstimateDocumentService>
