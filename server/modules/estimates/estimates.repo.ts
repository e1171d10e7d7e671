import { type SQL, and, asc, desc, eq, inArray, like, or, sql } from 'drizzle-orm'
import type { Database, Queryable, Tx } from '../../db/client'
import {
  customers,
  depositPayments,
  estimateConfirmations,
  estimateDecisions,
  estimates,
  estimateVersions,
  findings,
  jobs,
  outboundEmails,
  parts,
  photos,
  vehicles,
  workshops,
} from '../../db/schema'
import { recordAudit } from '../../lib/audit'
import { likePattern } from '../../lib/db-errors'
import { publishLive } from '../../lib/live-publish'
import { setJobStatus } from '../jobs/jobs.repo'
import type {
  EstimateDefaults,
  EstimateDraft,
  EstimateListQuery,
  EstimateSnapshot,
  EstimateStatus,
} from '../../../shared/schemas/estimates'
import { estimateStatusJoins, estimateStatusSql } from './estimate-status.sql'

export type { Queryable, Tx }

export type EstimateRecord = typeof estimates.$inferSelect
export type VersionRecord = typeof estimateVersions.$inferSelect
export type FindingRecord = typeof findings.$inferSelect
export type DecisionRecord = typeof estimateDecisions.$inferSelect
export type OutboundEmailRecord = typeof outboundEmails.$inferSelect

/** An estimate with the job, vehicle, customer and workshop it is for. */
export interface EstimateRow {
  estimate: EstimateRecord
  job: typeof jobs.$inferSelect
  vehicle: typeof vehicles.$inferSelect
  customer: typeof customers.$inferSelect
  workshop: typeof workshops.$inferSelect
}

/** A sent version with the customer's confirmation and its deposit, when there are any. */
export interface VersionRow {
  version: VersionRecord
  confirmation: typeof estimateConfirmations.$inferSelect | null
  deposit: typeof depositPayments.$inferSelect | null
}

/** One line of the estimates list, as the list query answers it. */
export type EstimateListRow = {
  id: string
  number: number
  status: EstimateStatus
  job_id: string
  customer_name: string
  registration: string
  currency: string
  draft: unknown
  proposed_gross: number | null
  approved_gross: number | null
  deposit_minor: number | null
  has_unsent_changes: boolean
  latest_version: number | null
  updated_at: string
  total: string
}

export interface NewVersion {
  workshopId: string
  estimateId: string
  version: number
  snapshot: EstimateSnapshot
  hash: string
  proposedGross: number
  expiresOn: string
  sentBy: string
}

/** Versions with the customer's confirmation and its deposit, and their workshop's time zone. */
function versionRows(q: Queryable) {
  return q
    .select({ version: estimateVersions, confirmation: estimateConfirmations, deposit: depositPayments, timezone: workshops.timezone })
    .from(estimateVersions)
    .innerJoin(workshops, eq(workshops.id, estimateVersions.workshopId))
    .leftJoin(estimateConfirmations, eq(estimateConfirmations.versionId, estimateVersions.id))
    .leftJoin(depositPayments, eq(depositPayments.confirmationId, estimateConfirmations.id))
}

export function createEstimatesRepo(db: Database) {
  return {
    /** For reads outside a transaction. */
    db: db as Queryable,
    transaction: <T>(fn: (tx: Tx) => Promise<T>) => db.transaction(fn),
    setJobStatus,
    recordAudit,
    publishLive,

    /** Today in the workshop's time zone: estimate dates are the workshop's calendar days. */
    async today(q: Queryable, timezone: string): Promise<string> {
      const r = await q.execute<{ d: string }>(sql`select to_char((now() at time zone ${timezone})::date, 'YYYY-MM-DD') as d`)
      return r.rows[0]?.d ?? new Date().toISOString().slice(0, 10)
    },

    /** Holds the job's estimate creation until the transaction ends, so two advisors cannot both open one. */
    async lockJobEstimates(tx: Tx, jobId: string): Promise<void> {
      await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${`estimate-job:${jobId}`}, 0))`)
    },

    /** The next number in the workshop's sequence. The counter row stays locked until the caller's transaction ends, so numbers are consecutive and a rolled-back creation leaves no gap. */
    async nextNumber(tx: Tx, workshopId: string): Promise<number> {
      const result = await tx.execute<{ last_number: number }>(sql`
        insert into estimate_counters (workshop_id, last_number) values (${workshopId}, 1)
        on conflict (workshop_id) do update set last_number = estimate_counters.last_number + 1
        returning last_number`)
      const n = result.rows[0]?.last_number
      if (n === undefined) throw new Error('estimate counter returned nothing')
      return Number(n)
    },

    async list(workshopId: string, q: EstimateListQuery) {
      const where: SQL[] = [sql`e.workshop_id = ${workshopId}`]
      if (q.jobId) where.push(sql`e.job_id = ${q.jobId}`)
      if (q.q) {
        const p = likePattern(q.q)
        const plate = likePattern(q.q.replace(/\s+/g, ''))
        const digits = q.q.replace(/^e-?0*/i, '')
        const byNumber = /^\d{1,9}$/.test(digits) ? sql` or e.number = ${Number(digits)}` : sql``
        where.push(sql`(c.name ilike ${p} or replace(ve.registration, ' ', '') ilike ${plate}${byNumber})`)
      }
      const order = {
        number: sql`e.number`,
        updatedAt: sql`greatest(e.updated_at, v.sent_at, v.opened_at, v.confirmed_at, dp.updated_at)`,
        customerName: sql`c.name`,
        proposedGross: sql`v.proposed_gross`,
      }[q.sortBy ?? 'updatedAt']
      const descending = q.sortDesc ?? (q.sortBy === undefined || q.sortBy === 'number' || q.sortBy === 'updatedAt')
      const statusFilter = q.status ? sql`where status = ${q.status}` : sql``
      const rows = await db.execute<EstimateListRow>(sql`
        with listed as (
          select e.id, e.number, ${estimateStatusSql} as status, e.job_id, c.name as customer_name, ve.registration, w.currency, e.draft,
            v.proposed_gross, ec.approved_gross, ec.deposit_minor,
            (e.sent_revision is null or e.sent_revision <> e.revision) and e.withdrawn_at is null as has_unsent_changes,
            v.version as latest_version,
            greatest(e.updated_at, v.sent_at, v.opened_at, v.confirmed_at, dp.updated_at) as updated_at,
            ${order} as sort_key
          from estimates e
          join workshops w on w.id = e.workshop_id
          join jobs j on j.id = e.job_id
          join vehicles ve on ve.id = j.vehicle_id
          join customers c on c.id = ve.customer_id
          ${estimateStatusJoins}
          where ${sql.join(where, sql` and `)}
        )
        select *, count(*) over () as total from listed ${statusFilter}
        order by sort_key ${descending ? sql`desc nulls last` : sql`asc nulls first`}, number desc
        limit ${q.pageSize} offset ${(q.page - 1) * q.pageSize}`)
      return { rows: rows.rows, total: Number(rows.rows[0]?.total ?? 0) }
    },

    async status(q: Queryable, workshopId: string, id: string): Promise<EstimateStatus | undefined> {
      const result = await q.execute<{ status: EstimateStatus }>(sql`
        select ${estimateStatusSql} as status
        from estimates e
        join workshops w on w.id = e.workshop_id
        ${estimateStatusJoins}
        where e.workshop_id = ${workshopId} and e.id = ${id}`)
      return result.rows[0]?.status
    },

    async find(q: Queryable, workshopId: string, id: string, lock = false): Promise<EstimateRow | undefined> {
      const query = q
        .select({ estimate: estimates, job: jobs, vehicle: vehicles, customer: customers, workshop: workshops })
        .from(estimates)
        .innerJoin(jobs, eq(jobs.id, estimates.jobId))
        .innerJoin(vehicles, eq(vehicles.id, jobs.vehicleId))
        .innerJoin(customers, eq(customers.id, vehicles.customerId))
        .innerJoin(workshops, eq(workshops.id, estimates.workshopId))
        .where(and(eq(estimates.workshopId, workshopId), eq(estimates.id, id)))
      const [row] = lock ? await query.for('update', { of: estimates }) : await query
      return row
    },

    async findJob(q: Queryable, workshopId: string, jobId: string): Promise<Omit<EstimateRow, 'estimate'> | undefined> {
      const [row] = await q
        .select({ job: jobs, vehicle: vehicles, customer: customers, workshop: workshops })
        .from(jobs)
        .innerJoin(vehicles, eq(vehicles.id, jobs.vehicleId))
        .innerJoin(customers, eq(customers.id, vehicles.customerId))
        .innerJoin(workshops, eq(workshops.id, jobs.workshopId))
        .where(and(eq(jobs.workshopId, workshopId), eq(jobs.id, jobId)))
      return row
    },

    async openEstimateForJob(q: Queryable, workshopId: string, jobId: string): Promise<{ id: string; number: number } | undefined> {
      const [row] = await q
        .select({ id: estimates.id, number: estimates.number })
        .from(estimates)
        .where(and(eq(estimates.workshopId, workshopId), eq(estimates.jobId, jobId), sql`${estimates.withdrawnAt} is null`))
      return row
    },

    async versions(q: Queryable, workshopId: string, estimateId: string): Promise<VersionRow[]> {
      return versionRows(q)
        .where(and(eq(estimateVersions.workshopId, workshopId), eq(estimateVersions.estimateId, estimateId)))
        .orderBy(asc(estimateVersions.version))
    },

    /** One sent version, with the time zone its dates are printed in. */
    async sentVersion(workshopId: string, versionId: string): Promise<(VersionRow & { timezone: string }) | undefined> {
      const [row] = await versionRows(db).where(and(eq(estimateVersions.workshopId, workshopId), eq(estimateVersions.id, versionId)))
      return row
    },

    async decisions(q: Queryable, workshopId: string, versionId: string): Promise<DecisionRecord[]> {
      return q
        .select()
        .from(estimateDecisions)
        .where(and(eq(estimateDecisions.workshopId, workshopId), eq(estimateDecisions.versionId, versionId)))
    },

    async emails(q: Queryable, workshopId: string, estimateId: string): Promise<OutboundEmailRecord[]> {
      return q
        .select()
        .from(outboundEmails)
        .where(and(eq(outboundEmails.workshopId, workshopId), eq(outboundEmails.estimateId, estimateId)))
        .orderBy(desc(outboundEmails.queuedAt))
        .limit(50)
    },

    async jobFindings(q: Queryable, workshopId: string, jobId: string): Promise<FindingRecord[]> {
      return q
        .select()
        .from(findings)
        .where(and(eq(findings.workshopId, workshopId), eq(findings.jobId, jobId)))
        .orderBy(asc(findings.createdAt))
    },

    async findingsByIds(q: Queryable, workshopId: string, ids: string[]): Promise<FindingRecord[]> {
      if (ids.length === 0) return []
      return q
        .select()
        .from(findings)
        .where(and(eq(findings.workshopId, workshopId), inArray(findings.id, ids)))
    },

    async photoIdsOf(q: Queryable, workshopId: string, findingIds: string[]): Promise<Map<string, string[]>> {
      if (findingIds.length === 0) return new Map<string, string[]>()
      const rows = await q
        .select({ id: photos.id, findingId: photos.findingId })
        .from(photos)
        .where(and(eq(photos.workshopId, workshopId), inArray(photos.findingId, findingIds)))
        .orderBy(asc(photos.createdAt))
      const out = new Map<string, string[]>()
      for (const r of rows) out.set(r.findingId, [...(out.get(r.findingId) ?? []), r.id])
      return out
    },

    /** Parts whose number is the code, or starts with `code-` (a code per vehicle group: SWV-SEAL-KIT-C). */
    async partsForCodes(q: Queryable, workshopId: string, codes: string[]) {
      if (codes.length === 0) return []
      return q
        .select({
          partNumber: parts.partNumber,
          description: parts.description,
          costMinor: parts.costMinor,
          sellPriceMinor: parts.sellPriceMinor,
          taxRate: parts.taxRate,
        })
        .from(parts)
        .where(
          and(
            eq(parts.workshopId, workshopId),
            sql`${parts.archivedAt} is null`,
            or(inArray(parts.partNumber, codes), ...codes.map((c) => like(parts.partNumber, `${c.replace(/[\\%_]/g, '\\$&')}-%`))),
          ),
        )
        .orderBy(asc(parts.partNumber))
    },

    async insertEstimate(
      tx: Tx,
      values: { workshopId: string; jobId: string; number: number; draft: EstimateDraft; createdBy: string },
    ): Promise<EstimateRecord> {
      const [estimate] = await tx.insert(estimates).values(values).returning()
      if (!estimate) throw new Error('estimate insert returned nothing')
      return estimate
    },

    /** Replaces the draft and moves the revision on; answers nothing when the estimate is gone. */
    async saveDraft(tx: Tx, workshopId: string, id: string, draft: EstimateDraft, revision: number): Promise<EstimateRecord | undefined> {
      const [saved] = await tx
        .update(estimates)
        .set({ draft, revision })
        .where(and(eq(estimates.workshopId, workshopId), eq(estimates.id, id)))
        .returning()
      return saved
    },

    /** Records which revision of the draft the customer now has. */
    async markSent(tx: Tx, workshopId: string, id: string, revision: number): Promise<void> {
      await tx
        .update(estimates)
        .set({ sentRevision: revision })
        .where(and(eq(estimates.workshopId, workshopId), eq(estimates.id, id)))
    },

    async markWithdrawn(tx: Tx, workshopId: string, id: string): Promise<void> {
      await tx
        .update(estimates)
        .set({ withdrawnAt: sql`now()` })
        .where(and(eq(estimates.workshopId, workshopId), eq(estimates.id, id)))
    },

    async insertVersion(tx: Tx, values: NewVersion): Promise<VersionRecord> {
      const [saved] = await tx.insert(estimateVersions).values(values).returning()
      if (!saved) throw new Error('version insert returned nothing')
      return saved
    },

    async supersedeVersion(tx: Tx, workshopId: string, versionId: string): Promise<void> {
      await tx
        .update(estimateVersions)
        .set({ supersededAt: sql`now()` })
        .where(and(eq(estimateVersions.workshopId, workshopId), eq(estimateVersions.id, versionId)))
    },

    /** The workshop's stored defaults for new estimates, unchecked: the service parses them. */
    async estimateDefaults(workshopId: string): Promise<unknown> {
      const [w] = await db.select({ d: workshops.estimateDefaults }).from(workshops).where(eq(workshops.id, workshopId))
      return w?.d
    },

    async saveEstimateDefaults(workshopId: string, defaults: EstimateDefaults): Promise<void> {
      await db.update(workshops).set({ estimateDefaults: defaults }).where(eq(workshops.id, workshopId))
    },
  }
}

export type EstimatesRepo = ReturnType<typeof createEstimatesRepo>
