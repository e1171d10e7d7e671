import { randomBytes } from 'node:crypto'
import { and, eq, inArray, isNull, ne, sql } from 'drizzle-orm'
import type { Database } from '../../db/client'
import { estimateLinks, estimateVersions } from '../../db/schema'
import { hashToken } from '../../lib/tokens'

type Tx = Pick<Database, 'insert' | 'update' | 'select'>

/**
 * The customer's link to one estimate version. 256 random bits, of which only the SHA-256 is
 * stored; it lives until the estimate's expiry date (unlike a 10-minute sign-in link) because it
 * opens that one estimate and nothing else, and is revoked when a newer version is sent or the
 * estimate is withdrawn.
 */
export async function issueEstimateLink(
  tx: Tx,
  link: { workshopId: string; versionId: string; customerId: string; expiresAt: Date },
): Promise<string> {
  const token = randomBytes(32).toString('base64url')
  await tx.insert(estimateLinks).values({ ...link, tokenHash: hashToken(token) })
  return token
}

/** Revokes every live link of the estimate's versions, except those of `keepVersionId`. */
export async function revokeEstimateLinks(tx: Tx, workshopId: string, estimateId: string, keepVersionId?: string): Promise<void> {
  const versions = tx
    .select({ id: estimateVersions.id })
    .from(estimateVersions)
    .where(and(eq(estimateVersions.workshopId, workshopId), eq(estimateVersions.estimateId, estimateId)))
  await tx
    .update(estimateLinks)
    .set({ revokedAt: sql`now()` })
    .where(
      and(
        eq(estimateLinks.workshopId, workshopId),
        inArray(estimateLinks.versionId, versions),
        isNull(estimateLinks.revokedAt),
        keepVersionId ? ne(estimateLinks.versionId, keepVersionId) : undefined,
      ),
    )
}

/** Where the customer's link leads; the portal reads the token from the query string. */
export function estimateLinkUrl(publicBaseUrl: string, token: string): string {
  return `${publicBaseUrl.replace(/\/$/, '')}/portal/open?token=${encodeURIComponent(token)}`
}
