import { and, eq } from 'drizzle-orm'
import type { Database } from '../../db/client'
import { depositPayments, estimateConfirmations, estimateVersions, workshops } from '../../db/schema'
import type { VersionRow } from './estimates.repo'

export function createEstimateDocumentRepo(db: Database) {
  return {
    /** One sent version with its confirmation and deposit, and the time zone its dates are printed in. */
    async version(workshopId: string, versionId: string): Promise<(VersionRow & { timezone: string }) | undefined> {
      const [row] = await db
        .select({ version: estimateVersions, confirmation: estimateConfirmations, deposit: depositPayments, timezone: workshops.timezone })
        .from(estimateVersions)
        .innerJoin(workshops, eq(workshops.id, estimateVersions.workshopId))
        .leftJoin(estimateConfirmations, eq(estimateConfirmations.versionId, estimateVersions.id))
        .leftJoin(depositPayments, eq(depositPayments.confirmationId, estimateConfirmations.id))
        .where(and(eq(estimateVersions.workshopId, workshopId), eq(estimateVersions.id, versionId)))
      return row
    },
  }
}

export type EstimateDocumentRepo = ReturnType<typeof createEstimateDocumentRepo>
