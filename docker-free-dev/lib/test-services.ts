import fs from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import { runMigrations } from '../../server/db/migrate'
import { type Child, projectRoot, startMaildev, startPaymentsFake, startSmsFake } from './children'
import { getPort, waitForPort } from './ports'
import { ensureDatabase, startPostgres } from './postgres'

export interface TestServices {
  env: Record<string, string>
  stop(): Promise<void>
}

/**
 * A throwaway PostgreSQL (own data folder, free port, a database ending in _test),
 * a mail catcher, the payments fake and the SMS fake, for one test run. stop() removes them all.
 */
export async function startTestServices(): Promise<TestServices> {
  const children: Child[] = []
  const dataRoot = fs.mkdtempSync(path.join(os.tmpdir(), 'tickover-test-'))
  fs.chmodSync(dataRoot, 0o755)
  const pg = await startPostgres({ dataDir: path.join(dataRoot, 'pg'), port: await getPort({ host: '127.0.0.1' }), throwaway: true })
  const stop = async () => {
    await Promise.all(children.map((c) => c.stop()))
    pg.stop()
    fs.rmSync(dataRoot, { recursive: true, force: true })
  }
  try {
    await ensureDatabase(pg, 'tickover_test')
    const databaseUrl = pg.urlFor('tickover_test')
    await runMigrations(databaseUrl)

    const smtpPort = await getPort({ host: '127.0.0.1' })
    const mailWebPort = await getPort({ host: '127.0.0.1', exclude: [smtpPort] })
    children.push(startMaildev(smtpPort, mailWebPort, true))

    const env: Record<string, string> = {
      DATABASE_URL: databaseUrl,
      SMTP_HOST: '127.0.0.1',
      SMTP_PORT: String(smtpPort),
      MAILDEV_URL: `http://127.0.0.1:${mailWebPort}`,
    }
    const waits = [waitForPort(smtpPort), waitForPort(mailWebPort)]

    if (fs.existsSync(path.join(projectRoot, 'docker-free-dev', 'payments-fake', 'main.ts'))) {
      const fakePort = await getPort({ host: '127.0.0.1', exclude: [smtpPort, mailWebPort] })
      children.push(startPaymentsFake({ port: fakePort, quiet: true }))
      env.PAYMENTS_FAKE_URL = `http://127.0.0.1:${fakePort}`
      waits.push(waitForPort(fakePort))
    }

    const taken = [smtpPort, mailWebPort, ...(env.PAYMENTS_FAKE_URL ? [Number(new URL(env.PAYMENTS_FAKE_URL).port)] : [])]
    const smsPort = await getPort({ host: '127.0.0.1', exclude: taken })
    // Quick status changes and retries, so a test waiting for a text to be delivered waits little.
    children.push(startSmsFake({ port: smsPort, stepMs: 50, callbackBackoffMs: 100, quiet: true }))
    env.SMS_FAKE_URL = `http://127.0.0.1:${smsPort}`
    waits.push(waitForPort(smsPort))
    await Promise.all(waits)
    return { env, stop }
  } catch (err) {
    await stop()
    throw err
  }
}
