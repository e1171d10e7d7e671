import { randomUUID } from 'node:crypto'
import { and, eq, sql } from 'drizzle-orm'
import getPort from 'get-port'
import { MailDev } from 'maildev'
import pg from 'pg'
import pino from 'pino'
import { afterAll, describe, expect, it } from 'vitest'
import { createDatabase } from '../../server/db/client'
import { estimates, outboundEmails } from '../../server/db/schema'
import { loadEnv } from '../../server/env'
import { NotFoundError } from '../../server/lib/errors'
import { type Mailer, createMailer } from '../../server/lib/mailer'
import { createQueue } from '../../server/lib/queue'
import { type OutboundMessage, type RetryPolicy, createEmailOutbox, createEmailWorker } from '../../server/modules/email/outbox'
import type { EstimateDraft } from '../../shared/schemas/estimates'
import { LIVE_CHANNEL, type LiveEvent } from '../../shared/schemas/live'
import { makeTestApp } from './helpers/app'
import { makeWorkshop } from './helpers/fixtures'
import { mailsTo, waitForMail } from './helpers/mail'

const env = loadEnv({ ...process.env, LOG_LEVEL: 'silent' })
const logger = pino({ level: 'silent' })
const { db, pool } = createDatabase(env.DATABASE_URL, logger, 4)
const cleanups: (() => Promise<void>)[] = []
afterAll(async () => {
  for (const c of cleanups.reverse()) await c()
  await pool.end()
})

/** The smallest file PDF readers accept as a PDF: header and end-of-file marker. */
const tinyPdf = new TextEncoder().encode('%PDF-1.4\n1 0 obj <<>> endobj\ntrailer <<>>\n%%EOF\n')

/**
 * An outbox and worker on a queue of their own: other test files run e-mail workers on the same
 * database, and they must not pick up (and deliver) this file's jobs with their own mail server.
 */
function makeOutbox(opts: { mailer?: Mailer; retry?: Partial<RetryPolicy> } = {}) {
  const jobs = createQueue(env.DATABASE_URL, logger, { max: 3 })
  const queueName = `email-test-${randomUUID().slice(0, 8)}`
  const rendered: { versionId: string; workshopId: string }[] = []
  const deps = { db, jobs, queueName, retry: { limit: 8, delaySeconds: 1, backoff: false, ...opts.retry } }
  const outbox = createEmailOutbox(deps)
  const worker = createEmailWorker({
    ...deps,
    mailer: opts.mailer ?? createMailer(env),
    logger,
    pollingIntervalSeconds: 0.5,
    attachments: {
      'estimate-pdf': async (a) => {
        rendered.push(a)
        return tinyPdf
      },
    },
  })
  worker.start()
  cleanups.push(async () => {
    await worker.stop()
    await jobs.stop(5_000)
  })
  return { outbox, worker, jobs, queueName, rendered }
}

async function waitFor<T>(what: string, probe: () => Promise<T | undefined | null | false>, timeoutMs = 20_000): Promise<T> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const value = await probe()
    if (value) return value
    if (Date.now() > deadline) throw new Error(`Timed out waiting for ${what}`)
    await new Promise((r) => setTimeout(r, 150))
  }
}

async function row(id: string) {
  const [r] = await db.select().from(outboundEmails).where(eq(outboundEmails.id, id))
  return r
}

async function makeEstimate(workshopId: string, jobId: string) {
  // Only a target for the outbox's foreign key: the draft is never read here.
  const draft = { items: [] } as unknown as EstimateDraft
  const [e] = await db
    .insert(estimates)
    .values({ workshopId, jobId, number: Math.floor(Math.random() * 1e9), draft })
    .returning()
  if (!e) throw new Error('no estimate')
  return e
}

/** Everything published on the live channel while it is open. */
async function listenLive() {
  const client = new pg.Client({ connectionString: env.DATABASE_URL })
  await client.connect()
  const events: LiveEvent[] = []
  client.on('notification', (n) => events.push(JSON.parse(n.payload ?? '{}') as LiveEvent))
  await client.query(`listen ${LIVE_CHANNEL}`)
  cleanups.push(() => client.end())
  return events
}

function message(workshopId: string, over: Partial<OutboundMessage> = {}): OutboundMessage {
  const tag = randomUUID().slice(0, 8)
  return {
    workshopId,
    kind: 'estimate.sent',
    to: `keeper-${tag}@outbox.test`,
    subject: `Your estimate ${tag}`,
    text: 'Your estimate is ready.',
    html: '<p>Your estimate is <strong>ready</strong>.</p>',
    ...over,
  }
}

describe('e-mail outbox', () => {
  it('delivers a queued message with both parts, reply-to, sender name and the PDF, and records it as sent', async () => {
    const f = await makeWorkshop(db)
    const estimate = await makeEstimate(f.workshop.id, f.job.id)
    const live = await listenLive()
    const { outbox, rendered } = makeOutbox()
    const versionId = randomUUID()
    const msg = message(f.workshop.id, {
      estimateId: estimate.id,
      replyTo: 'desk@hilltop.test',
      fromName: 'Hilltop 4x4',
      attachments: [{ type: 'estimate-pdf', versionId, filename: 'estimate-E-0042.pdf' }],
    })

    const { id } = await outbox.queue(msg)

    const mail = await waitForMail(msg.to, { timeoutMs: 20_000 })
    expect(mail.subject).toBe(msg.subject)
    expect(mail.text.trim()).toBe(msg.text)
    expect(mail.html).toContain('<strong>ready</strong>')
    const full = (await (await fetch(`${process.env.MAILDEV_URL}/api/email/${mail.id}`)).json()) as {
      from: { address: string; name?: string }[]
      attachments: { filename: string; generatedFileName: string; contentType: string }[]
    }
    expect(full.from[0]?.name).toBe('Hilltop 4x4')
    // The catcher's parsed headers leave Reply-To out, so it is read from the message as sent.
    const source = await (await fetch(`${process.env.MAILDEV_URL}/api/email/${mail.id}/source`)).text()
    expect(source).toMatch(/^Reply-To: desk@hilltop\.test\r?$/im)
    expect(full.attachments).toHaveLength(1)
    const [att] = full.attachments
    expect(att).toMatchObject({ filename: 'estimate-E-0042.pdf', contentType: 'application/pdf' })
    const bytes = new Uint8Array(
      await (await fetch(`${process.env.MAILDEV_URL}/api/email/${mail.id}/attachment/${att?.generatedFileName}`)).arrayBuffer(),
    )
    expect(Buffer.from(bytes).equals(Buffer.from(tinyPdf))).toBe(true)
    expect(rendered).toEqual([{ versionId, workshopId: f.workshop.id }])

    const sent = await waitFor('the row to be marked sent', async () => ((await row(id))?.status === 'sent' ? row(id) : undefined))
    expect(sent).toMatchObject({ status: 'sent', attempts: 1, lastError: null, kind: 'estimate.sent' })
    expect(sent?.sentAt).toBeInstanceOf(Date)

    const mine = await waitFor('the sent event', async () => {
      const e = live.filter((x) => x.estimateId === estimate.id)
      return e.some((x) => /sent/.test(x.summary ?? '')) && e
    })
    expect(mine.map((e) => e.type)).toEqual(['email.status', 'email.status'])
    expect(mine[0]).toMatchObject({ workshopId: f.workshop.id, summary: `E-mail to ${msg.to} queued` })
    expect(mine[1]).toMatchObject({ summary: `E-mail to ${msg.to} sent` })
  })

  it('delivers a message sent while the mail server is down once it comes back', async () => {
    const f = await makeWorkshop(db)
    const smtpPort = await getPort({ host: '127.0.0.1' })
    const { outbox } = makeOutbox({
      mailer: createMailer({ ...env, SMTP_PORT: smtpPort }),
      retry: { limit: 30, delaySeconds: 1, backoff: false },
    })
    const msg = message(f.workshop.id)

    const { id } = await outbox.queue(msg)

    const failing = await waitFor('two failed attempts', async () => {
      const r = await row(id)
      return r && r.attempts >= 2 && r
    })
    expect(failing.status).toBe('queued')
    expect(failing.lastError).toMatch(/ECONNREFUSED/)
    expect(failing.lastError).not.toMatch(/\n|at .+\.js/)

    const maildev = new MailDev({ smtp: smtpPort, ip: '127.0.0.1', disableWeb: true, silent: true })
    const caught: { subject: string; to: { address: string }[] }[] = []
    const { smtp } = await maildev.start()
    smtp.on('new', (mail: (typeof caught)[number]) => caught.push(mail))
    cleanups.push(() => maildev.stop())

    const sent = await waitFor(
      'the message to be sent after the mail server came back',
      async () => ((await row(id))?.status === 'sent' ? row(id) : undefined),
      30_000,
    )
    expect(sent?.attempts).toBeGreaterThanOrEqual(failing.attempts + 1)
    expect(sent?.lastError).toBeNull()
    expect(caught.filter((m) => m.to.some((t) => t.address === msg.to)).map((m) => m.subject)).toEqual([msg.subject])
  })

  it('keeps nothing and sends nothing when the caller rolls back', async () => {
    const f = await makeWorkshop(db)
    const { outbox } = makeOutbox()
    const rolledBack = message(f.workshop.id)
    let queuedId = ''

    await expect(
      db.transaction(async (tx) => {
        queuedId = (await outbox.queue(rolledBack, tx)).id
        throw new Error('the change this e-mail reports failed')
      }),
    ).rejects.toThrow('the change this e-mail reports failed')

    expect(queuedId).not.toBe('')
    expect(await row(queuedId)).toBeUndefined()
    const jobsLeft = await db.execute(sql`select 1 from pgboss.job where data->>'emailId' = ${queuedId}`)
    expect(jobsLeft.rows).toHaveLength(0)

    // A message queued afterwards on the same queue is delivered: by then the worker has passed the rolled-back one.
    const later = message(f.workshop.id)
    await outbox.queue(later)
    await waitForMail(later.to, { timeoutMs: 20_000 })
    expect(await mailsTo(rolledBack.to)).toEqual([])
  })

  it('marks a message failed when its retries run out, and sends it when queued again', async () => {
    const f = await makeWorkshop(db)
    const estimate = await makeEstimate(f.workshop.id, f.job.id)
    const live = await listenLive()
    const real = createMailer(env)
    let down = true
    const mailer: Mailer = {
      async send(m) {
        if (down)
          throw new Error(
            '421 Service not available, closing transmission channel\n    at SMTPConnection._actionGreeting (smtp-connection.js:1:1)',
          )
        await real.send(m)
      },
    }
    const { outbox } = makeOutbox({ mailer, retry: { limit: 2, delaySeconds: 1, backoff: false } })
    const msg = message(f.workshop.id, { estimateId: estimate.id })

    const { id } = await outbox.queue(msg)

    const failed = await waitFor('the message to be marked failed', async () =>
      (await row(id))?.status === 'failed' ? row(id) : undefined,
    )
    // One attempt and two retries.
    expect(failed).toMatchObject({
      status: 'failed',
      attempts: 3,
      lastError: '421 Service not available, closing transmission channel',
      sentAt: null,
    })
    await waitFor('the failed event', async () =>
      live.some((e) => e.estimateId === estimate.id && /could not be sent: 421/.test(e.summary ?? '')),
    )

    down = false
    await outbox.resend(f.workshop.id, id)
    expect(await row(id)).toMatchObject({ status: 'queued', lastError: null })

    await waitForMail(msg.to, { timeoutMs: 20_000 })
    const sent = await waitFor('the resent message to be marked sent', async () =>
      (await row(id))?.status === 'sent' ? row(id) : undefined,
    )
    expect(sent).toMatchObject({ attempts: 4, lastError: null })
    expect(await mailsTo(msg.to)).toHaveLength(1)
  })

  it('answers 404 when asked to resend another workshop’s e-mail, and changes nothing', async () => {
    const mine = await makeWorkshop(db)
    const theirs = await makeWorkshop(db)
    const { outbox } = makeOutbox()
    const { id } = await outbox.queue(message(theirs.workshop.id))
    const theirRow = await waitFor('their message to be sent', async () => ((await row(id))?.status === 'sent' ? row(id) : undefined))

    const err = await outbox.resend(mine.workshop.id, id).catch((e: unknown) => e)
    expect(err).toBeInstanceOf(NotFoundError)
    expect((err as NotFoundError).status).toBe(404)
    await expect(outbox.resend(mine.workshop.id, 'not-an-id')).rejects.toBeInstanceOf(NotFoundError)
    expect(await row(id)).toEqual(theirRow)
  })

  it('queues again a queued message whose job is gone', async () => {
    const f = await makeWorkshop(db)
    const { worker } = makeOutbox()
    const msg = message(f.workshop.id)
    // As left behind when a process stopped during a message's last attempt: queued, with no live job.
    const [orphan] = await db
      .insert(outboundEmails)
      .values({
        workshopId: f.workshop.id,
        kind: msg.kind,
        to: msg.to,
        subject: msg.subject,
        message: { text: msg.text, html: msg.html, replyTo: null, fromName: null, attachments: [] },
      })
      .returning()
    if (!orphan) throw new Error('no row')

    // One process sweeps at a time (advisory lock): while another test file's worker holds it, a sweep
    // does nothing, so sweep until one has run rather than trusting the first call.
    const jobs = async () =>
      (
        await db.execute(
          sql`select 1 from pgboss.job where data->>'emailId' = ${orphan.id} and state in ('created', 'retry', 'active', 'completed')`,
        )
      ).rows
    await waitFor('a sweep to queue the orphan', async () => {
      await worker.sweep()
      return (await jobs()).length > 0
    })
    expect(await jobs()).toHaveLength(1)
    await waitForMail(msg.to, { timeoutMs: 20_000 })
    await waitFor('the swept message to be marked sent', async () => (await row(orphan.id))?.status === 'sent')
  })

  it('is wired into the test app, whose worker delivers what its outbox queues', async () => {
    const t = makeTestApp()
    cleanups.push(t.close)
    const f = await makeWorkshop(t.db)
    const msg = message(f.workshop.id)
    const { id } = await t.outbox.queue(msg)
    await waitForMail(msg.to, { timeoutMs: 20_000 })
    await waitFor('the row to be marked sent', async () => {
      const [r] = await db
        .select()
        .from(outboundEmails)
        .where(and(eq(outboundEmails.id, id), eq(outboundEmails.status, 'sent')))
      return r
    })
  })
})
