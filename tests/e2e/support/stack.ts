import { execFileSync } from 'node:child_process'
import crypto from 'node:crypto'
import fs from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import { drizzle } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import {
  type Child,
  bin,
  projectRoot,
  startChild,
  startMaildev,
  startPaymentsFake,
  startSmsFake,
} from '../../../docker-free-dev/lib/children'
import { getPort, waitForPort } from '../../../docker-free-dev/lib/ports'
import { type PostgresHandle, ensureDatabase, startPostgres } from '../../../docker-free-dev/lib/postgres'
import { runMigrations } from '../../../server/db/migrate'
import * as schema from '../../../server/db/schema'
import { seedDemo } from '../../../server/db/seed'
import type { E2eContext } from './context'

/** Not `tickover_test`: a name of its own, so nobody mistakes this database for the unit tests' one. */
export const E2E_DATABASE = 'tickover_e2e_test'

export interface E2eStack {
  context: E2eContext
  /** Where the app server's output goes, for reading after a failure. */
  appLog: string
  stop(): Promise<void>
}

const STARTUP_MS = 90_000
const seconds = (since: number) => `${((Date.now() - since) / 1000).toFixed(1)} s`
const say = (line: string) => process.stdout.write(`[e2e] ${line}\n`)

/** The client as `npm start` builds it, but into a folder of its own, so a running dev server's dist/ is left alone. */
export function buildClient(outDir: string): void {
  execFileSync(bin('vite'), ['build', '--outDir', outDir, '--emptyOutDir', '--logLevel', 'warn'], { cwd: projectRoot, stdio: 'inherit' })
}

async function waitUntilReady(url: string, app: Child, log: string, timeoutMs: number): Promise<void> {
  const deadline = Date.now() + timeoutMs
  while (Date.now() < deadline) {
    if (app.process.exitCode !== null || app.process.signalCode !== null) {
      throw new Error(`The app server stopped while starting (exit ${app.process.exitCode ?? app.process.signalCode}).\n${tail(log)}`)
    }
    const ok = await fetch(url).then(
      (r) => r.ok,
      () => false,
    )
    if (ok) return
    await new Promise((r) => setTimeout(r, 200))
  }
  throw new Error(`${url} did not answer 200 within ${timeoutMs / 1000} s.\n${tail(log)}`)
}

function tail(file: string, lines = 40): string {
  if (!fs.existsSync(file)) return '(no app output)'
  return fs.readFileSync(file, 'utf8').trimEnd().split('\n').slice(-lines).join('\n')
}

/**
 * Everything a journey talks to, isolated from `npm start` and from the unit tests: a throwaway
 * PostgreSQL with the demo data, the mail catcher, the payments and SMS fakes and the real server process
 * serving the built client, each on a free port of 127.0.0.1. stop() removes it all.
 */
export async function startE2eStack(opts: { clientDist: string; logDir: string }): Promise<E2eStack> {
  const children: Child[] = []
  let postgres: PostgresHandle | undefined
  const dataRoot = fs.mkdtempSync(path.join(os.tmpdir(), 'tickover-e2e-'))
  // As root, PostgreSQL runs as the postgres user, which must be able to reach its data folder.
  fs.chmodSync(dataRoot, 0o755)
  fs.mkdirSync(opts.logDir, { recursive: true })
  const appLog = path.join(opts.logDir, 'e2e-app.log')
  fs.writeFileSync(appLog, '')

  const stop = async () => {
    // The app first, so it is not left answering with a database that has gone.
    const app = children.find((c) => c.name === 'app')
    await app?.stop()
    await Promise.all(children.filter((c) => c !== app).map((c) => c.stop()))
    postgres?.stop()
    fs.rmSync(dataRoot, { recursive: true, force: true })
  }

  try {
    const taken: number[] = []
    const freePort = async () => {
      const port = await getPort({ host: '127.0.0.1', exclude: taken })
      taken.push(port)
      return port
    }
    const ports = {
      postgres: await freePort(),
      app: await freePort(),
      smtp: await freePort(),
      mailWeb: await freePort(),
      payments: await freePort(),
      sms: await freePort(),
    }

    let t = Date.now()
    postgres = await startPostgres({ dataDir: path.join(dataRoot, 'pg'), port: ports.postgres, throwaway: true })
    await ensureDatabase(postgres, E2E_DATABASE)
    const databaseUrl = postgres.urlFor(E2E_DATABASE)
    await runMigrations(databaseUrl)
    const pool = new pg.Pool({ connectionString: databaseUrl, max: 1 })
    try {
      await seedDemo(drizzle(pool, { schema, casing: 'snake_case' }))
    } finally {
      await pool.end()
    }
    say(`database ${E2E_DATABASE} migrated and seeded in ${seconds(t)}`)

    t = Date.now()
    const baseURL = `http://127.0.0.1:${ports.app}`
    const paymentsURL = `http://127.0.0.1:${ports.payments}`
    const webhookSecret = `whsec_e2e_${crypto.randomBytes(12).toString('hex')}`
    const paymentsKey = `sk_test_e2e_${crypto.randomBytes(6).toString('hex')}`
    children.push(startMaildev(ports.smtp, ports.mailWeb, true))
    // Same wiring as `npm start`: the fake signs its webhooks with the secret the app checks them with.
    children.push(startPaymentsFake({ port: ports.payments, webhookUrl: `${baseURL}/api/payments/webhook`, webhookSecret, quiet: true }))
    const smsURL = `http://127.0.0.1:${ports.sms}`
    children.push(startSmsFake({ port: ports.sms, stepMs: 100, quiet: true }))

    const uploads = path.join(dataRoot, 'uploads')
    fs.mkdirSync(uploads)
    const app = startChild(
      'app',
      bin('tsx'),
      ['server/index.ts'],
      {
        NODE_ENV: 'production',
        HOST: '127.0.0.1',
        PORT: String(ports.app),
        DATABASE_URL: databaseUrl,
        PUBLIC_BASE_URL: baseURL,
        CLIENT_DIST: opts.clientDist,
        UPLOAD_DIR: uploads,
        SMTP_HOST: '127.0.0.1',
        SMTP_PORT: String(ports.smtp),
        AUTH_SECRET: crypto.randomBytes(32).toString('base64url'),
        LOG_LEVEL: 'warn',
        PAYMENTS_FAKE_URL: paymentsURL,
        STRIPE_SECRET_KEY: paymentsKey,
        STRIPE_API_BASE: paymentsURL,
        STRIPE_WEBHOOK_SECRET: webhookSecret,
        // The app runs as in production, where these have no defaults: a fresh account of the SMS fake.
        TWILIO_ACCOUNT_SID: `AC${crypto.randomBytes(16).toString('hex')}`,
        TWILIO_AUTH_TOKEN: crypto.randomBytes(16).toString('hex'),
        TWILIO_FROM: '+15005550006',
        TWILIO_API_BASE: smsURL,
      },
      true,
    )
    children.push(app)
    const logStream = fs.createWriteStream(appLog, { flags: 'a' })
    app.process.stdout?.on('data', (chunk: Buffer) => logStream.write(chunk))
    app.process.stderr?.on('data', (chunk: Buffer) => logStream.write(chunk))
    app.process.once('exit', () => logStream.end())

    // Generous: on two cores shared with other work, tsx compiling three programs at once can take a while.
    await Promise.all([
      waitForPort(ports.smtp, STARTUP_MS),
      waitForPort(ports.mailWeb, STARTUP_MS),
      waitForPort(ports.payments, STARTUP_MS),
      waitForPort(ports.sms, STARTUP_MS),
    ])
    await waitUntilReady(`${baseURL}/api/ready`, app, appLog, STARTUP_MS)
    say(`app, mail catcher and payments fake ready in ${seconds(t)} at ${baseURL}`)

    return {
      context: { baseURL, maildevURL: `http://127.0.0.1:${ports.mailWeb}`, paymentsURL, paymentsKey },
      appLog,
      stop,
    }
  } catch (err) {
    await stop()
    throw err
  }
}
