import os from 'node:os'
import path from 'node:path'
import pino from 'pino'
import { createApp } from '../../../server/app'
import { createDatabase } from '../../../server/db/client'
import { createLiveHub } from '../../../server/lib/live-hub'
import { loadEnv } from '../../../server/env'
import { createMailer } from '../../../server/lib/mailer'
import { createQueue } from '../../../server/lib/queue'
import { createEstimatesRepo } from '../../../server/modules/estimates/estimates.repo'
import { createEstimateDocumentService } from '../../../server/modules/estimates/estimate-document.service'
import { createEmailOutbox, createEmailWorker } from '../../../server/modules/email/outbox'

/** The real app on the test database, without a built client. */
export function makeTestApp(overrides: Record<string, string> = {}) {
  const uploads = path.join(os.tmpdir(), `tickover-test-uploads-${process.pid}`)
  const env = {
    ...loadEnv({ ...process.env, LOG_LEVEL: 'silent', RATE_LIMITS: 'false', UPLOAD_DIR: uploads, ...overrides }),
    CLIENT_DIST: '',
  }
  const logger = pino({ level: 'silent' })
  const { db, pool } = createDatabase(env.DATABASE_URL, logger, 4)
  // Each test app is a server process of its own, with its own database listener.
  const liveHub = createLiveHub({ connectionString: env.DATABASE_URL, logger, retryMs: 100, maxRetryMs: 1_000 })
  // …and its own job queue and e-mail worker, started in the background so this stays synchronous.
  const jobs = createQueue(env.DATABASE_URL, logger, { max: 3 })
  const outbox = createEmailOutbox({ db, jobs })
  const documents = createEstimateDocumentService({ repo: createEstimatesRepo(db) })
  const emailWorker = createEmailWorker({
    db,
    jobs,
    mailer: createMailer(env),
    logger,
    attachments: { 'estimate-pdf': async (a) => (await documents.renderVersion(a.workshopId, a.versionId)).bytes },
    pollingIntervalSeconds: 0.5,
    concurrency: 1,
  })
  emailWorker.start()
  const app = createApp({ env, db, pool, logger, version: 'test', liveHub, outbox })
  const close = async () => {
    await emailWorker.stop()
    await jobs.stop(5_000)
    await liveHub.close()
    await pool.end()
  }
  return { app, db, pool, env, liveHub, outbox, jobs, close }
}
