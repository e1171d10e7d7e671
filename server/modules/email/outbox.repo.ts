import { type SQL, and, eq, sql } from 'drizzle-orm'
import type PgBoss from 'pg-boss'
import type { Database, Queryable, Tx } from '../../db/client'
import { outboundEmails } from '../../db/schema'
import { QUEUE_SCHEMA } from '../../lib/queue'

/** The outbox's queries: the outbound_emails rows, and the SQL pg-boss runs inside the caller's transaction. */

export type EmailRow = typeof outboundEmails.$inferSelect
/** Anything that runs statements: the database, or the caller's transaction. */
export type Executor = Pick<Database, 'execute'>
export type Writer = Pick<Database, 'insert' | 'execute'>

/**
 * pg-boss runs its SQL through whatever executor it is given. Handing it the caller's
 * transaction makes the job part of that transaction: a worker cannot see it before the
 * e-mail's row is committed, and a rollback removes both. (Enqueueing after commit instead
 * would lose the message if the process stopped in between.)
 */
export function bossExecutor(q: Executor): PgBoss.Db {
  return {
    async executeSql(text: string, values: unknown[] = []) {
      const chunks: SQL[] = []
      let from = 0
      for (const m of text.matchAll(/\$(\d+)/g)) {
        chunks.push(sql.raw(text.slice(from, m.index)), sql`${sql.param(values[Number(m[1]) - 1])}`)
        from = m.index + m[0].length
      }
      chunks.push(sql.raw(text.slice(from)))
      const result = await q.execute(sql.join(chunks))
      return { rows: result.rows }
    },
  }
}

export function createOutboxRepo(db: Database) {
  return {
    transaction: <T>(fn: (tx: Tx) => Promise<T>) => db.transaction(fn),

    /** Records a message to send, in the caller's transaction when it passes one. */
    async insert(q: Writer, values: typeof outboundEmails.$inferInsert): Promise<string> {
      const [row] = await q.insert(outboundEmails).values(values).returning({ id: outboundEmails.id })
      if (!row) throw new Error('outbound e-mail was not recorded')
      return row.id
    },

    async byId(emailId: string): Promise<EmailRow | undefined> {
      const [row] = await db.select().from(outboundEmails).where(eq(outboundEmails.id, emailId))
      return row
    },

    /** The workshop's message, locked until the caller commits so two "Send again" clicks queue it once. */
    async lock(tx: Tx, workshopId: string, emailId: string): Promise<EmailRow | undefined> {
      const [row] = await tx
        .select()
        .from(outboundEmails)
        .where(and(eq(outboundEmails.id, emailId), eq(outboundEmails.workshopId, workshopId)))
        .for('update')
      return row
    },

    async markQueuedAgain(tx: Queryable, emailId: string) {
      await tx
        .update(outboundEmails)
        .set({ status: 'queued', lastError: null, sentAt: null, queuedAt: new Date() })
        .where(eq(outboundEmails.id, emailId))
    },

    /** One more attempt failed; the last one marks the message failed. A message no longer queued is left alone. */
    async recordFailure(tx: Queryable, emailId: string, reason: string, last: boolean) {
      await tx
        .update(outboundEmails)
        .set({ attempts: sql`${outboundEmails.attempts} + 1`, lastError: reason, status: last ? 'failed' : 'queued' })
        .where(and(eq(outboundEmails.id, emailId), eq(outboundEmails.status, 'queued')))
    },

    async recordSent(tx: Queryable, emailId: string) {
      await tx
        .update(outboundEmails)
        .set({ attempts: sql`${outboundEmails.attempts} + 1`, lastError: null, status: 'sent', sentAt: new Date() })
        .where(eq(outboundEmails.id, emailId))
    },

    /** One process sweeps at a time; the lock is held until the caller's transaction ends. */
    async trySweepLock(tx: Tx): Promise<boolean> {
      const locked = await tx.execute<{ locked: boolean }>(
        sql`select pg_try_advisory_xact_lock(hashtext('tickover.email-outbox.sweep')) as locked`,
      )
      return locked.rows[0]?.locked === true
    },

    /** Queued messages whose job has gone, oldest first. */
    async orphans(q: Queryable, limit: number): Promise<string[]> {
      const rows = await q.execute<{ id: string }>(sql`
        select e.id from outbound_emails e
        where e.status = 'queued'
          and not exists (
            select 1 from ${sql.identifier(QUEUE_SCHEMA)}.job j
            where j.data->>'emailId' = e.id::text and j.state in ('created', 'retry', 'active'))
        order by e.queued_at
        limit ${limit}`)
      return rows.rows.map((r) => r.id)
    },
  }
}
