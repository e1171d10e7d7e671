import fs from 'node:fs'
import path from 'node:path'
import { createApp } from './app'
import { createDatabase } from './db/client'
import { EnvError, loadEnv } from './env'
import { createLiveHub } from './lib/live-hub'
import { createLogger } from './lib/logger'
import { createMailer } from './lib/mailer'
import { createQueue } from './lib/queue'
import { createEstimatesRepo } from './modules/estimates/estimates.repo'
import { createEstimateDocumentService } from './modules/estimates/estimate-document.service'
import { createEmailOutbox, createEmailWorker } from './modules/email/outbox'

let env
try {
  env = loadEnv()
} catch (err) {
  if (err instanceof EnvError) {
    console.error(err.message)
    process.exit(1)
  }
  throw err
}

const logger = createLogger(env.LOG_LEVEL)
const { db, pool } = createDatabase(env.DATABASE_URL, logger, env.DATABASE_POOL_MAX)
const pkg = JSON.parse(fs.readFileSync(path.resolve(import.meta.dirname, '..', 'package.json'), 'utf8')) as { version: string }
const liveHub = createLiveHub({ connectionString: env.DATABASE_URL, logger })
const mailer = createMailer(env)
const jobs = createQueue(env.DATABASE_URL, logger)
const outbox = createEmailOutbox({ db, jobs })
const documents = createEstimateDocumentService({ repo: createEstimatesRepo(db) })
const emailWorker = createEmailWorker({
  db,
  jobs,
  mailer,
  logger,
  attachments: { 'estimate-pdf': async (a) => (await documents.renderVersion(a.workshopId, a.versionId)).bytes },
})
emailWorker.start()
const app = createApp({ env, db, pool, logger, version: pkg.version, liveHub, mailer, outbox })

const server = app.listen(env.PORT, env.HOST)
server.on('listening', () => logger.info(`Tickover listening on http://${env.HOST}:${env.PORT}`))
server.on('error', (err: NodeJS.ErrnoException) => {
  if (err.code === 'EADDRINUSE') {
    console.error(`Port ${env.PORT} on ${env.HOST} (Tickover web server) is already in use. Stop what uses it or set PORT=<port>.`)
  } else {
    console.error(err)
  }
  process.exit(1)
})

let stopping = false
async function shutdown(signal: string) {
  if (stopping) return
  stopping = true
  logger.info({ signal }, 'shutting down')
  const force = setTimeout(() => process.exit(1), 10_000)
  force.unref()
  server.close()
  // Live streams never end by themselves: closing the hub ends them, so browsers reconnect to another process.
  await liveHub.close()
  server.closeIdleConnections()
  // A message being handed to the mail server is finished; the rest wait in the queue for the next process.
  await emailWorker.stop()
  await jobs.stop(7_000)
  await pool.end().catch(() => undefined)
  process.exit(0)
}
process.on('SIGTERM', () => void shutdown('SIGTERM'))
process.on('SIGINT', () => void shutdown('SIGINT'))
