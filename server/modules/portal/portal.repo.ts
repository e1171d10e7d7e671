import { and, asc, desc, eq, getTableColumns, isNull, sql } from 'drizzle-orm'
import type { Database, Queryable, Tx } from '../../db/client'
import {
  customers,
  depositPayments,
  estimateConfirmations,
  estimateDecisions,
  estimateLinks,
  estimateQuestions,
  estimates,
  estimateVersions,
  photos,
  staffUsers,
  vehicles,
  workshops,
} from '../../db/schema'
import { recordAudit } from '../../lib/audit'
import { publishLive } from '../../lib/live-publish'
import { setJobStatus } from '../jobs/jobs.repo'
import type { Decision } from '../../../shared/estimate/contract'
import type { EstimateSnapshot } from '../../../shared/schemas/estimates'
import { versionExpiredSql } from '../estimates/estimate-status.sql'
import { issueEstimateLink, linkExpiry } from './estimate-links.repo'

export type { Queryable, Tx }

const expiredSql = versionExpiredSql(estimateVersions.expiresOn, workshops.timezone)

const versionColumns = { ...getTableColumns(estimateVersions), expired: expiredSql }

export type VersionRow = typeof estimateVersions.$inferSelect & { expired: boolean }

/** Drizzle queries of the customer's portal; every query names the workshop, and the caller's customer where it reads. */
export function createPortalRepo(db: Database) {
  return {
    /** What reads outside a transaction run on; services need no more of it than any query handle. */
    db: db as Queryable,
    transaction: <T>(fn: (tx: Tx) => Promise<T>) => db.transaction(fn),

    /** The link a token stands for, with its version and estimate, whatever state they are in. */
    async linkByHash(q: Queryable, tokenHash: string) {
      const [row] = await q
        .select({
          link: estimateLinks,
          version: versionColumns,
          estimate: { id: estimates.id, withdrawnAt: estimates.withdrawnAt, jobId: estimates.jobId },
        })
        .from(estimateLinks)
        .innerJoin(
          estimateVersions,
          and(eq(estimateVersions.workshopId, estimateLinks.workshopId), eq(estimateVersions.id, estimateLinks.versionId)),
        )
        .innerJoin(estimates, and(eq(estimates.workshopId, estimateVersions.workshopId), eq(estimates.id, estimateVersions.estimateId)))
        .innerJoin(workshops, eq(workshops.id, estimateLinks.workshopId))
        .where(eq(estimateLinks.tokenHash, tokenHash))
      return row
    },

    /** Every sent version of one estimate, oldest first. */
    async versions(q: Queryable, workshopId: string, estimateId: string): Promise<VersionRow[]> {
      return q
        .select(versionColumns)
        .from(estimateVersions)
        .innerJoin(workshops, eq(workshops.id, estimateVersions.workshopId))
        .where(and(eq(estimateVersions.workshopId, workshopId), eq(estimateVersions.estimateId, estimateId)))
        .orderBy(asc(estimateVersions.version))
    },

    /**
     * The estimate row shared-locked for the rest of the transaction, so it cannot be sent again or
     * withdrawn until the caller commits.
     */
    async lockEstimate(tx: Tx, workshopId: string, estimateId: string) {
      const [row] = await tx
        .select({ id: estimates.id, jobId: estimates.jobId, withdrawnAt: estimates.withdrawnAt })
        .from(estimates)
        .where(and(eq(estimates.workshopId, workshopId), eq(estimates.id, estimateId)))
        .for('share')
      return row
    },

    async estimate(q: Queryable, workshopId: string, estimateId: string) {
      const [row] = await q
        .select({ id: estimates.id, jobId: estimates.jobId, withdrawnAt: estimates.withdrawnAt, workshopTimezone: workshops.timezone })
        .from(estimates)
        .innerJoin(workshops, eq(workshops.id, estimates.workshopId))
        .where(and(eq(estimates.workshopId, workshopId), eq(estimates.id, estimateId)))
      return row
    },

    /**
     * Locks one version row for the rest of the transaction: decisions and the confirmation of a
     * version are made one at a time, and a newer version cannot supersede it half-way through.
     */
    async lockVersion(tx: Tx, workshopId: string, estimateId: string, version: number): Promise<VersionRow | undefined> {
      const [row] = await tx
        .select(versionColumns)
        .from(estimateVersions)
        .innerJoin(workshops, eq(workshops.id, estimateVersions.workshopId))
        .where(
          and(
            eq(estimateVersions.workshopId, workshopId),
            eq(estimateVersions.estimateId, estimateId),
            eq(estimateVersions.version, version),
          ),
        )
        .for('update', { of: estimateVersions })
      return row
    },

    async latestVersionNumber(q: Queryable, workshopId: string, estimateId: string): Promise<number | undefined> {
      const [row] = await q
        .select({ version: estimateVersions.version })
        .from(estimateVersions)
        .where(and(eq(estimateVersions.workshopId, workshopId), eq(estimateVersions.estimateId, estimateId)))
        .orderBy(desc(estimateVersions.version))
        .limit(1)
      return row?.version
    },

    async decisions(q: Queryable, workshopId: string, versionId: string): Promise<Record<string, Decision>> {
      const rows = await q
        .select({ itemId: estimateDecisions.itemId, decision: estimateDecisions.decision })
        .from(estimateDecisions)
        .where(and(eq(estimateDecisions.workshopId, workshopId), eq(estimateDecisions.versionId, versionId)))
      return Object.fromEntries(rows.map((r) => [r.itemId, r.decision]))
    },

    async saveDecision(tx: Tx, row: { workshopId: string; versionId: string; itemId: string; decision: Decision }) {
      await tx
        .insert(estimateDecisions)
        .values(row)
        .onConflictDoUpdate({
          target: [estimateDecisions.versionId, estimateDecisions.itemId],
          set: { decision: row.decision, decidedAt: sql`now()` },
        })
    },

    async confirmation(q: Queryable, workshopId: string, versionId: string) {
      const [row] = await q
        .select({ confirmation: estimateConfirmations, deposit: depositPayments })
        .from(estimateConfirmations)
        .leftJoin(depositPayments, eq(depositPayments.confirmationId, estimateConfirmations.id))
        .where(and(eq(estimateConfirmations.workshopId, workshopId), eq(estimateConfirmations.versionId, versionId)))
      return row
    },

    async insertConfirmation(tx: Tx, values: typeof estimateConfirmations.$inferInsert) {
      const [row] = await tx.insert(estimateConfirmations).values(values).returning()
      if (!row) throw new Error('confirmation insert returned nothing')
      return row
    },

    async markConfirmed(tx: Tx, workshopId: string, versionId: string) {
      await tx
        .update(estimateVersions)
        .set({ confirmedAt: sql`now()` })
        .where(and(eq(estimateVersions.workshopId, workshopId), eq(estimateVersions.id, versionId)))
    },

    /** True the first time only: openedAt records the first opening and is never moved. */
    async markOpened(tx: Tx, workshopId: string, versionId: string): Promise<boolean> {
      const rows = await tx
        .update(estimateVersions)
        .set({ openedAt: sql`now()` })
        .where(
          and(eq(estimateVersions.workshopId, workshopId), eq(estimateVersions.id, versionId), sql`${estimateVersions.openedAt} is null`),
        )
        .returning({ id: estimateVersions.id })
      return rows.length > 0
    },

    async touchLink(tx: Tx, linkId: string) {
      await tx
        .update(estimateLinks)
        .set({ lastUsedAt: sql`now()` })
        .where(eq(estimateLinks.id, linkId))
    },

    /** A job already finished or cancelled is left as it is: a late confirmation does not reopen it. */
    setJobStatus,
    linkExpiry,
    issueLink: issueEstimateLink,
    recordAudit,
    publishLive,

    async customer(q: Queryable, workshopId: string, customerId: string) {
      const [row] = await q
        .select({ id: customers.id, name: customers.name, email: customers.email, archivedAt: customers.archivedAt })
        .from(customers)
        .where(and(eq(customers.workshopId, workshopId), eq(customers.id, customerId)))
      return row
    },

    /** The customer's estimates: those whose latest version was addressed to them. */
    async listForCustomer(workshopId: string, customerId: string) {
      const result = await db.execute<{
        id: string
        withdrawn_at: string | null
        version: number
        snapshot: EstimateSnapshot
        sent_at: string
        expires_on: string
        expired: boolean
        opened_at: string | null
        confirmed_at: string | null
        proposed_gross: number
        approved_gross: number | null
        deposit_status: 'awaiting_payment' | 'paid' | 'refunded' | null
        workshop_name: string
      }>(sql`
        select e.id, e.withdrawn_at, v.version, v.snapshot, v.sent_at, v.expires_on::text as expires_on,
          ${versionExpiredSql(sql`v.expires_on`, sql`w.timezone`)} as expired,
          v.opened_at, v.confirmed_at, v.proposed_gross, ec.approved_gross, dp.status as deposit_status, w.name as workshop_name
        from estimates e
        join workshops w on w.id = e.workshop_id
        join lateral (select * from estimate_versions x where x.workshop_id = e.workshop_id and x.estimate_id = e.id order by x.version desc limit 1) v on true
        left join estimate_confirmations ec on ec.version_id = v.id
        left join deposit_payments dp on dp.confirmation_id = ec.id
        where e.workshop_id = ${workshopId} and v.snapshot->'customer'->>'id' = ${customerId}
        order by v.sent_at desc`)
      return result.rows
    },

    async questions(q: Queryable, workshopId: string, estimateId: string, customerId?: string) {
      return q
        .select({
          question: estimateQuestions,
          version: estimateVersions.version,
          answeredByName: staffUsers.name,
          customerName: customers.name,
        })
        .from(estimateQuestions)
        .innerJoin(
          estimateVersions,
          and(eq(estimateVersions.workshopId, estimateQuestions.workshopId), eq(estimateVersions.id, estimateQuestions.versionId)),
        )
        .innerJoin(customers, and(eq(customers.workshopId, estimateQuestions.workshopId), eq(customers.id, estimateQuestions.customerId)))
        .leftJoin(staffUsers, and(eq(staffUsers.workshopId, estimateQuestions.workshopId), eq(staffUsers.id, estimateQuestions.answeredBy)))
        .where(
          and(
            eq(estimateQuestions.workshopId, workshopId),
            eq(estimateQuestions.estimateId, estimateId),
            customerId ? eq(estimateQuestions.customerId, customerId) : undefined,
          ),
        )
        .orderBy(asc(estimateQuestions.askedAt))
    },

    async insertQuestion(tx: Tx, values: typeof estimateQuestions.$inferInsert) {
      const [row] = await tx.insert(estimateQuestions).values(values).returning()
      if (!row) throw new Error('question insert returned nothing')
      return row
    },

    async lockQuestion(tx: Tx, workshopId: string, estimateId: string, questionId: string) {
      const [row] = await tx
        .select()
        .from(estimateQuestions)
        .where(
          and(
            eq(estimateQuestions.workshopId, workshopId),
            eq(estimateQuestions.estimateId, estimateId),
            eq(estimateQuestions.id, questionId),
          ),
        )
        .for('update')
      return row
    },

    async answerQuestion(tx: Tx, questionId: string, answer: string, staffId: string) {
      const [row] = await tx
        .update(estimateQuestions)
        .set({ answer, answeredBy: staffId, answeredAt: sql`now()` })
        .where(eq(estimateQuestions.id, questionId))
        .returning()
      if (!row) throw new Error('question vanished inside its own transaction')
      return row
    },

    /** The customer's own vehicles that the workshop has not archived. */
    async vehicles(workshopId: string, customerId: string) {
      return db
        .select({ id: vehicles.id, registration: vehicles.registration, make: vehicles.make, model: vehicles.model, year: vehicles.year })
        .from(vehicles)
        .where(and(eq(vehicles.workshopId, workshopId), eq(vehicles.customerId, customerId), isNull(vehicles.archivedAt)))
        .orderBy(asc(vehicles.registration))
    },

    async photo(workshopId: string, photoId: string) {
      const [row] = await db
        .select()
        .from(photos)
        .where(and(eq(photos.workshopId, workshopId), eq(photos.id, photoId)))
      return row
    },
  }
}

export type PortalRepo = ReturnType<typeof createPortalRepo>
/**
 * The part of the repo a portal service is given: reads, transactions, the audit log and live
 * events, and the queries it names; a unit test fakes just that part.
 */
export type PortalRepoPart<K extends keyof PortalRepo> = Pick<PortalRepo, 'db' | 'transaction' | 'recordAudit' | 'publishLive' | K>
/** A version's confirmation with its deposit, when one has been asked for. */
export type ConfirmedRow = NonNullable<Awaited<ReturnType<PortalRepo['confirmation']>>>
export type QuestionRow = Awaited<ReturnType<PortalRepo['questions']>>[number]
