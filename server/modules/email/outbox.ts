import type PgBoss from 'pg-boss'
import type { Logger } from 'pino'
import type { Database } from '../../db/client'
import { NotFoundError } from '../../lib/errors'
import { publishLive } from '../../lib/live-publish'
import type { MailMessage, Mailer } from '../../lib/mailer'
import type { JobQueue } from '../../lib/queue'
import { type EmailRow, type Executor, type Writer, bossExecutor, createOutboxRepo } from './outbox.repo'

/**
 * The outbox: every e-mail sent on a workshop's behalf is written to outbound_emails and handed
 * to the PostgreSQL-backed queue, so a mail server that is down delays a message and loses nothing.
 */

/** An attachment rendered when the message is sent, so a retry always sends the same document. */
export type OutboundAttachment = { type: 'estimate-pdf'; versionId: string; filename: string }

export interface OutboundMessage {
  workshopId: string
  estimateId?: string | null
  /** What the message is for ("estimate.sent", "estimate.confirmed"), shown to the advisor. */
  kind: string
  to: string
  subject: string
  text: string
  html: string
  replyTo?: string | null
  fromName?: string | null
  attachments?: OutboundAttachment[]
}

export interface EmailOutbox {
  /**
   * Records the message and queues it. Pass the caller's transaction so the message exists only
   * if the change it reports is committed.
   */
  queue(message: OutboundMessage, tx?: Writer): Promise<{ id: string }>
  /** Queues a failed or sent message again (the advisor's "Send again"); one still queued is left to the job it has. */
  resend(workshopId: string, emailId: string): Promise<void>
}

/** Turns an attachment's reference into its bytes when the message is sent. */
export type AttachmentRenderers = Partial<
  Record<OutboundAttachment['type'], (a: { versionId: string; workshopId: string }) => Promise<Uint8Array>>
>

export interface RetryPolicy {
  /** Retries after the first attempt; the message is marked failed when the last one fails. */
  limit: number
  delaySeconds: number
  /** Doubles the delay after each attempt (with jitter), so a long outage is not hammered. */
  backoff: boolean
}

/** Eight retries from 5 s with backoff span roughly 20 to 40 minutes of mail server outage. */
export const defaultRetry: RetryPolicy = { limit: 8, delaySeconds: 5, backoff: true }
export const EMAIL_QUEUE = 'email-send'

export interface OutboxDeps {
  db: Database
  jobs: JobQueue
  /** Tests give each outbox a queue of its own so other test files' workers leave its jobs alone. */
  queueName?: string
  retry?: Partial<RetryPolicy>
}

export interface EmailWorkerDeps extends OutboxDeps {
  mailer: Mailer
  logger: Logger
  attachments: AttachmentRenderers
  pollingIntervalSeconds?: number
  /** How often rows left queued without a job are queued again. */
  sweepIntervalSeconds?: number
  /** Messages sent at the same time by this process. */
  concurrency?: number
}

interface StoredMessage {
  text: string
  html: string
  replyTo: string | null
  fromName: string | null
  attachments: OutboundAttachment[]
}

interface EmailJob {
  emailId: string
}

const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i

function settings(deps: OutboxDeps) {
  const retry = { ...defaultRetry, ...deps.retry }
  const queueName = deps.queueName ?? EMAIL_QUEUE
  const jobOptions = { retryLimit: retry.limit, retryDelay: retry.delaySeconds, retryBackoff: retry.backoff, expireInSeconds: 300 }
  return {
    queueName,
    jobOptions,
    /** Creates the queue on first use; job options are also given on every job, so a changed policy applies to new jobs. */
    ready: () => deps.jobs.declare(queueName, jobOptions),
  }
}

async function enqueue(q: Executor, boss: PgBoss, s: ReturnType<typeof settings>, emailId: string) {
  const jobId = await boss.send(s.queueName, { emailId } satisfies EmailJob, { ...s.jobOptions, db: bossExecutor(q) })
  // pg-boss answers null rather than failing when the queue does not exist.
  if (!jobId) throw new Error(`The job queue "${s.queueName}" did not accept the e-mail`)
}

async function announce(q: Executor, row: Pick<EmailRow, 'workshopId' | 'estimateId' | 'to'>, summary: string) {
  if (!row.estimateId) return
  await publishLive(q, { type: 'email.status', workshopId: row.workshopId, estimateId: row.estimateId, summary: summary.slice(0, 300) })
}

export function createEmailOutbox(deps: OutboxDeps): EmailOutbox {
  const { db, jobs } = deps
  const repo = createOutboxRepo(db)
  const s = settings(deps)

  return {
    async queue(message, tx) {
      // Outside the caller's transaction: the first call may create the queue.
      await s.ready()
      const stored: StoredMessage = {
        text: message.text,
        html: message.html,
        replyTo: message.replyTo ?? null,
        fromName: message.fromName ?? null,
        attachments: message.attachments ?? [],
      }
      const write = async (q: Writer) => {
        const id = await repo.insert(q, {
          workshopId: message.workshopId,
          estimateId: message.estimateId ?? null,
          kind: message.kind,
          to: message.to,
          subject: message.subject,
          message: { ...stored },
        })
        await enqueue(q, jobs.boss, s, id)
        await announce(
          q,
          { workshopId: message.workshopId, estimateId: message.estimateId ?? null, to: message.to },
          `E-mail to ${message.to} queued`,
        )
        return { id }
      }
      return tx ? write(tx) : repo.transaction(write)
    },

    async resend(workshopId, emailId) {
      if (!uuidPattern.test(emailId)) throw new NotFoundError('No such e-mail')
      await s.ready()
      await repo.transaction(async (tx) => {
        const row = await repo.lock(tx, workshopId, emailId)
        if (!row) throw new NotFoundError('No such e-mail')
        // A queued message already has a job on its way; a second would send it twice.
        if (row.status === 'queued') return
        await repo.markQueuedAgain(tx, emailId)
        await enqueue(tx, jobs.boss, s, emailId)
        await announce(tx, row, `E-mail to ${row.to} queued again`)
      })
    },
  }
}

export interface EmailWorker {
  /** Starts sending; keeps trying in the background when the database cannot be reached yet. */
  start(): void
  stop(): Promise<void>
  /** Queues again every queued message whose job is gone; answers how many. */
  sweep(): Promise<number>
}

/** The short reason kept on the row and shown to the advisor: the message only, never a stack. */
export function shortError(err: unknown): string {
  const message = err instanceof Error ? err.message : String(err)
  const line = message.split('\n')[0]?.trim() || 'Unknown error'
  return line.length > 200 ? `${line.slice(0, 199)}…` : line
}

export function createEmailWorker(deps: EmailWorkerDeps): EmailWorker {
  const { jobs, mailer, logger } = deps
  const repo = createOutboxRepo(deps.db)
  const s = settings(deps)
  const sweepMs = (deps.sweepIntervalSeconds ?? 60) * 1000
  let started = false
  let stopped = false
  let startTimer: NodeJS.Timeout | undefined
  let sweepTimer: NodeJS.Timeout | undefined
  const workerIds: string[] = []

  async function render(row: EmailRow, attachments: OutboundAttachment[]): Promise<NonNullable<MailMessage['attachments']>> {
    const rendered = []
    for (const a of attachments) {
      const renderer = deps.attachments[a.type]
      if (!renderer) throw new Error(`No renderer for ${a.type} attachments`)
      rendered.push({
        filename: a.filename,
        content: await renderer({ versionId: a.versionId, workshopId: row.workshopId }),
        contentType: 'application/pdf',
      })
    }
    return rendered
  }

  async function deliver(job: PgBoss.JobWithMetadata<EmailJob>) {
    const row = await repo.byId(job.data.emailId)
    // Sent, failed or gone in the meantime: nothing to do, and nothing to retry.
    if (!row || row.status !== 'queued') return
    const stored = row.message as unknown as StoredMessage
    try {
      await mailer.send({
        to: row.to,
        subject: row.subject,
        text: stored.text,
        html: stored.html,
        replyTo: stored.replyTo ?? undefined,
        fromName: stored.fromName ?? undefined,
        attachments: await render(row, stored.attachments ?? []),
      })
    } catch (err) {
      const reason = shortError(err)
      const last = job.retryCount >= job.retryLimit
      await repo.transaction(async (tx) => {
        await repo.recordFailure(tx, row.id, reason, last)
        if (last) await announce(tx, row, `E-mail to ${row.to} could not be sent: ${reason}`)
      })
      logger.warn({ emailId: row.id, attempt: job.retryCount + 1, last, reason }, 'e-mail not sent')
      // Thrown again so pg-boss schedules the next attempt with its backoff (or records the job as failed).
      throw new Error(reason, { cause: err })
    }
    await repo.transaction(async (tx) => {
      await repo.recordSent(tx, row.id)
      await announce(tx, row, `E-mail to ${row.to} sent`)
    })
  }

  /**
   * A committed queued row always has a job (they are written in one transaction), but a job can
   * still end without the row being updated: the process stopped during the last attempt, or the
   * database was unreachable when the failure was to be recorded. Those rows are queued again.
   */
  async function sweep(): Promise<number> {
    await s.ready()
    return repo.transaction(async (tx) => {
      // One process sweeps at a time; the others skip rather than queue the same row twice.
      if (!(await repo.trySweepLock(tx))) return 0
      const orphans = await repo.orphans(tx, 200)
      for (const id of orphans) await enqueue(tx, jobs.boss, s, id)
      if (orphans.length) logger.warn({ count: orphans.length }, 'queued e-mails without a job were queued again')
      return orphans.length
    })
  }

  async function begin() {
    await s.ready()
    if (stopped) return
    const options = { batchSize: 1, pollingIntervalSeconds: deps.pollingIntervalSeconds ?? 2, includeMetadata: true as const }
    for (let i = 0; i < (deps.concurrency ?? 2); i++) {
      workerIds.push(await jobs.boss.work<EmailJob>(s.queueName, options, async ([job]) => (job ? deliver(job) : undefined)))
    }
    const sweepQuietly = () => sweep().catch((err: unknown) => logger.warn({ err: { message: shortError(err) } }, 'e-mail sweep failed'))
    void sweepQuietly()
    sweepTimer = setInterval(sweepQuietly, sweepMs)
    sweepTimer.unref()
  }

  function tryStart() {
    startTimer = undefined
    begin().catch((err: unknown) => {
      if (stopped) return
      logger.error({ err: { message: shortError(err) } }, 'e-mail worker could not start; trying again in 15 s')
      startTimer = setTimeout(tryStart, 15_000)
      startTimer.unref()
    })
  }

  return {
    start() {
      if (started || stopped) return
      started = true
      tryStart()
    },
    async stop() {
      stopped = true
      clearTimeout(startTimer)
      clearInterval(sweepTimer)
      for (const id of workerIds.splice(0)) await jobs.boss.offWork({ id })
    },
    sweep,
  }
}
