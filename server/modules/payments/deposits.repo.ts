import { and, desc, eq } from 'drizzle-orm'
import type { Database, Queryable, Tx } from '../../db/client'
import { customers, depositPayments, estimateConfirmations, estimates, estimateVersions, paymentEvents, workshops } from '../../db/schema'
import { recordAudit } from '../../lib/audit'
import { publishLive } from '../../lib/live-publish'
import { setJobStatus } from '../jobs/jobs.repo'

export type { Tx }
type Db = Queryable

export type DepositRow = typeof depositPayments.$inferSelect

/** Drizzle queries for deposits; every lock is FOR UPDATE on the deposit row alone. */
export function createDepositsRepo(db: Database) {
  return {
    transaction: <T>(fn: (tx: Tx) => Promise<T>) => db.transaction(fn),
    setJobStatus,
    recordAudit,
    publishLive,

    /** Everything a payment page, receipt or live event says about one confirmation. */
    async confirmationDetails(q: Db, confirmationId: string) {
      const [row] = await q
        .select({
          confirmation: {
            id: estimateConfirmations.id,
            workshopId: estimateConfirmations.workshopId,
            depositMinor: estimateConfirmations.depositMinor,
          },
          version: { id: estimateVersions.id, version: estimateVersions.version, snapshot: estimateVersions.snapshot },
          estimate: { id: estimates.id, number: estimates.number, jobId: estimates.jobId, withdrawnAt: estimates.withdrawnAt },
          workshop: { id: workshops.id, name: workshops.name, email: workshops.email },
          customer: { id: customers.id, name: customers.name, email: customers.email },
        })
        .from(estimateConfirmations)
        .innerJoin(
          estimateVersions,
          and(eq(estimateVersions.workshopId, estimateConfirmations.workshopId), eq(estimateVersions.id, estimateConfirmations.versionId)),
        )
        .innerJoin(estimates, and(eq(estimates.workshopId, estimateVersions.workshopId), eq(estimates.id, estimateVersions.estimateId)))
        .innerJoin(workshops, eq(workshops.id, estimateConfirmations.workshopId))
        .innerJoin(
          customers,
          and(eq(customers.workshopId, estimateConfirmations.workshopId), eq(customers.id, estimateConfirmations.customerId)),
        )
        .where(eq(estimateConfirmations.id, confirmationId))
      return row
    },

    /** The estimate in this workshop, with the confirmation of its newest confirmed version (if any). */
    async latestConfirmation(workshopId: string, estimateId: string) {
      const [estimate] = await db
        .select({ id: estimates.id })
        .from(estimates)
        .where(and(eq(estimates.workshopId, workshopId), eq(estimates.id, estimateId)))
      if (!estimate) return undefined
      const [confirmed] = await db
        .select({ confirmationId: estimateConfirmations.id })
        .from(estimateConfirmations)
        .innerJoin(
          estimateVersions,
          and(eq(estimateVersions.workshopId, estimateConfirmations.workshopId), eq(estimateVersions.id, estimateConfirmations.versionId)),
        )
        .where(and(eq(estimateVersions.workshopId, workshopId), eq(estimateVersions.estimateId, estimateId)))
        .orderBy(desc(estimateVersions.version))
        .limit(1)
      return { estimateId: estimate.id, confirmationId: confirmed?.confirmationId ?? null }
    },

    /** Creates the deposit row once; a concurrent creator waits for this one and then finds it. */
    async ensureDeposit(q: Db, values: { workshopId: string; confirmationId: string; amountMinor: number; currency: string }) {
      await q.insert(depositPayments).values(values).onConflictDoNothing({ target: depositPayments.confirmationId })
    },

    async lockByConfirmation(q: Db, confirmationId: string): Promise<DepositRow | undefined> {
      const [row] = await q.select().from(depositPayments).where(eq(depositPayments.confirmationId, confirmationId)).for('update')
      return row
    },

    async lockBySession(q: Db, sessionId: string): Promise<DepositRow | undefined> {
      const [row] = await q.select().from(depositPayments).where(eq(depositPayments.checkoutSessionId, sessionId)).for('update')
      return row
    },

    async lockById(q: Db, id: string): Promise<DepositRow | undefined> {
      const [row] = await q.select().from(depositPayments).where(eq(depositPayments.id, id)).for('update')
      return row
    },

    async byConfirmation(confirmationId: string): Promise<DepositRow | undefined> {
      const [row] = await db.select().from(depositPayments).where(eq(depositPayments.confirmationId, confirmationId))
      return row
    },

    async bySession(sessionId: string): Promise<DepositRow | undefined> {
      const [row] = await db.select().from(depositPayments).where(eq(depositPayments.checkoutSessionId, sessionId))
      return row
    },

    async update(q: Db, id: string, values: Partial<typeof depositPayments.$inferInsert>): Promise<DepositRow> {
      const [row] = await q.update(depositPayments).set(values).where(eq(depositPayments.id, id)).returning()
      if (!row) throw new Error(`deposit ${id} vanished inside its own transaction`)
      return row
    },

    /** True the first time an event id is seen; a concurrent delivery of the same id waits, then gets false. */
    async recordEvent(q: Db, eventId: string, type: string): Promise<boolean> {
      const inserted = await q
        .insert(paymentEvents)
        .values({ eventId, type })
        .onConflictDoNothing({ target: paymentEvents.eventId })
        .returning({ eventId: paymentEvents.eventId })
      return inserted.length > 0
    },
  }
}

export type DepositsRepo = ReturnType<typeof createDepositsRepo>
export type ConfirmationDetails = NonNullable<Awaited<ReturnType<DepositsRepo['confirmationDetails']>>>
