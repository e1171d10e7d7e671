import { randomBytes } from 'node:crypto'
import { and, eq, inArray, isNull, ne, sql } from 'drizzle-orm'
import type { Queryable } from '../../db/client'
import { linkExpiresAtSql } from '../estimates/estimate-status.sql'
import { estimateLinks, estimateVersions } from '../../db/schema'
import { hashToken } from '../../lib/tokens'

/**
 * The customer's link to one estimate version. 256 random bits, of which only the SHA-256 is
 * stored; it lives until the estimate's expiry date (unlike a 10-minute sign-in link) because it
 * opens that one estimate and nothing else, and is revoked when a newer version is sent or the
 * estimate is withdrawn.
 */
export async function issueEstimateLink(
  tx: Queryable,
  link: { workshopId: string; versionId: string; customerId: string; expiresAt: Date },
): Promise<string> {
  const token = randomBytes(32).toString('base64url')
  await tx.insert(estimateLinks).values({ ...link, tokenHash: hashToken(token) })
  return token
}

/** Revokes every live link of the estimate's versions, except those of `keepVersionId`. */
export async function revokeEstimateLinks(tx: Queryable, workshopId: string, estimateId: string, keepVersionId?: string): Promise<void> {
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

/** The end of the version's decision day in the workshop's time zone: when its links stop working. */
export async function linkExpiry(q: Queryable, workshopId: string, versionId: string): Promise<Date> {
  const r = await q.execute<{ at: Date | string }>(sql`
    select ${linkExpiresAtSql(sql`v.expires_on`, sql`w.timezone`)} as at
    from estimate_versions v join workshops w on w.id = v.workshop_id
    where v.workshop_id = ${workshopId} and v.id = ${versionId}`)
  const at = r.rows[0]?.at
  if (!at) throw new Error('version vanished while issuing a link')
  return new Date(at)
}

/** The customer's links to sent versions, as sending and withdrawing an estimate use them. */
export interface EstimateLinks {
  /** Revokes every live link of the estimate's versions, except those of `keepVersionId`. */
  revoke(tx: Queryable, workshopId: string, estimateId: string, keepVersionId?: string): Promise<void>
  /** A new link to the version, working until the end of its decision day; answers the token. */
  issue(tx: Queryable, link: { workshopId: string; versionId: string; customerId: string }): Promise<string>
}

export const storedEstimateLinks: EstimateLinks = {
  revoke: revokeEstimateLinks,
  issue: async (tx, link) => issueEstimateLink(tx, { ...link, expiresAt: await linkExpiry(tx, link.workshopId, link.versionId) }),
}
