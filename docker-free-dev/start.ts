/**
 * `npm start` / `npm run dev`: PostgreSQL, the mail catcher, the payments and SMS fakes and the app, all on
 * 127.0.0.1, with demo data on first run. Ctrl-C stops everything; the data folder (.data/) is kept.
 */
import { execFileSync } from 'node:child_process'
import path from 'node:path'
import pg from 'pg'
import { drizzle } from 'drizzle-orm/node-postgres'
import { runMigrations } from '../server/db/migrate'
import * as schema from '../server/db/schema'
import { seedDemo } from '../server/db/seed'
import {
  LOCAL_STRIPE_SECRET_KEY,
  LOCAL_STRIPE_WEBHOOK_SECRET,
  LOCAL_TWILIO_ACCOUNT_SID,
  LOCAL_TWILIO_AUTH_TOKEN,
  LOCAL_TWILIO_FROM,
} from '../server/env'
import { type Child, bin, projectRoot, startChild, startMaildev, startPaymentsFake, startSmsFake } from './lib/children'
import { PortInUseError, assertPortFree, waitForPort } from './lib/ports'
import { type PostgresHandle, ensureDatabase, startPostgres } from './lib/postgres'

const dev = process.argv.includes('--dev')
const num = (name: string, fallback: number) => Number(process.env[name] ?? fallback)
const ports = {
  app: num('PORT', 3000),
  vite: num('VITE_PORT', 5173),
  postgres: num('TICKOVER_PG_PORT', 54329),
  smtp: num('MAILDEV_SMTP_PORT', 1025),
  mailWeb: num('MAILDEV_WEB_PORT', 1080),
  payments: num('PAYMENTS_FAKE_PORT', 12111),
  sms: num('SMS_FAKE_PORT', 12112),
}
const dataDir = path.join(projectRoot, '.data', 'postgres')
const children: Child[] = []
let postgres: PostgresHandle | undefined
let stopping = false

async function stopAll(code: number): Promise<never> {
  if (!stopping) {
    stopping = true
    await Promise.all(children.map((c) => c.stop()))
    postgres?.stop()
  }
  process.exit(code)
}

async function main() {
  await assertPortFree(ports.app, 'Tickover web server', 'PORT')
  await assertPortFree(ports.smtp, 'mail catcher SMTP', 'MAILDEV_SMTP_PORT')
  await assertPortFree(ports.mailWeb, 'mail catcher web', 'MAILDEV_WEB_PORT')
  await assertPortFree(ports.payments, 'payments fake', 'PAYMENTS_FAKE_PORT')
  await assertPortFree(ports.sms, 'SMS fake', 'SMS_FAKE_PORT')
  if (dev) await assertPortFree(ports.vite, 'Vite dev server', 'VITE_PORT')

  if (!dev) {
    console.log('Building the client…')
    execFileSync(bin('vite'), ['build', '--logLevel', 'warn'], { cwd: projectRoot, stdio: 'inherit' })
  }

  console.log('Starting PostgreSQL…')
  postgres = await startPostgres({ dataDir, port: ports.postgres })
  await ensureDatabase(postgres, 'tickover')
  const databaseUrl = postgres.urlFor('tickover')
  await runMigrations(databaseUrl)
  const pool = new pg.Pool({ connectionString: databaseUrl, max: 1 })
  const seeded = await seedDemo(drizzle(pool, { schema, casing: 'snake_case' }))
  await pool.end()
  console.log(seeded === 'seeded' ? 'Demo workshop created.' : 'Existing data kept.')

  children.push(startMaildev(ports.smtp, ports.mailWeb, true))
  const paymentsUrl = `http://127.0.0.1:${ports.payments}`
  children.push(
    startPaymentsFake({
      port: ports.payments,
      webhookUrl: `http://127.0.0.1:${ports.app}/api/payments/webhook`,
      webhookSecret: LOCAL_STRIPE_WEBHOOK_SECRET,
    }),
  )
  const smsUrl = `http://127.0.0.1:${ports.sms}`
  children.push(startSmsFake({ port: ports.sms }))

  const appEnv = {
    NODE_ENV: dev ? 'development' : 'production',
    PORT: String(ports.app),
    DATABASE_URL: databaseUrl,
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(ports.smtp),
    PAYMENTS_FAKE_URL: paymentsUrl,
    // `npm start` runs the app as in production, where these have no defaults; here they are the fake's.
    STRIPE_SECRET_KEY: LOCAL_STRIPE_SECRET_KEY,
    STRIPE_WEBHOOK_SECRET: LOCAL_STRIPE_WEBHOOK_SECRET,
    TWILIO_ACCOUNT_SID: LOCAL_TWILIO_ACCOUNT_SID,
    TWILIO_AUTH_TOKEN: LOCAL_TWILIO_AUTH_TOKEN,
    TWILIO_FROM: LOCAL_TWILIO_FROM,
    TWILIO_API_BASE: smsUrl,
    SMS_FAKE_URL: smsUrl,
    PUBLIC_BASE_URL: process.env.PUBLIC_BASE_URL ?? `http://127.0.0.1:${dev ? ports.vite : ports.app}`,
    CLIENT_DIST: dev ? '' : path.join(projectRoot, 'dist'),
  }
  const serverArgs = dev ? ['watch', '--clear-screen=false', 'server/index.ts'] : ['server/index.ts']
  const server = startChild('app', bin('tsx'), serverArgs, appEnv)
  children.push(server)
  server.process.once('exit', (code) => {
    if (!stopping) {
      console.error(`The app server stopped (exit ${code}); stopping the other services.`)
      void stopAll(1)
    }
  })
  if (dev) children.push(startChild('vite', bin('vite'), ['--port', String(ports.vite), '--strictPort'], { PORT: String(ports.app) }))

  await Promise.all([
    waitForPort(ports.app),
    waitForPort(ports.smtp),
    waitForPort(ports.mailWeb),
    waitForPort(ports.payments),
    waitForPort(ports.sms),
  ])
  if (dev) await waitForPort(ports.vite)

  const appUrl = dev ? `http://127.0.0.1:${ports.vite}/` : `http://127.0.0.1:${ports.app}/`
  console.log(`
Tickover is running (Ctrl-C stops everything; data stays in .data/):
  App              ${appUrl}
  API ready check  http://127.0.0.1:${ports.app}/api/ready
  Mail catcher     http://127.0.0.1:${ports.mailWeb}/   (sign-in links arrive here)
  Payments fake    ${paymentsUrl}/
  SMS fake         ${smsUrl}/   (texts the app sends arrive here)
  PostgreSQL       127.0.0.1:${ports.postgres} (data in .data/postgres)
`)
}

process.on('SIGINT', () => void stopAll(0))
process.on('SIGTERM', () => void stopAll(0))

main().catch(async (err: unknown) => {
  console.error(err instanceof PortInUseError ? err.message : err)
  await stopAll(1)
})
