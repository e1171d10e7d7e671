import type { Database } from '../../db/client'
import { createEstimatesRepo } from './estimates.repo'
import { createEstimateDocumentService } from './estimate-document.service'

/** For the portal's PDF route, which holds only the database until it is given the document service. */
export function renderVersionPdf(db: Database, workshopId: string, versionId: string): Promise<{ bytes: Uint8Array; filename: string }> {
  return createEstimateDocumentService({ repo: createEstimatesRepo(db) }).renderVersion(workshopId, versionId)
}
