import os from 'node:os'
import path from 'node:path'
import pino from 'pino'
import { createApp } from '../../../server/app'
import { createDatabase } from '../../../server/db/client'
import { loadEnv } from '../../../server/env'

/** The real app on the test database, without a built client. */
export function makeTestApp(overrides: Record<string, string> = {}) {
  const uploads = path.join(os.tmpdir(), `tickover-test-uploads-${process.pid}`)
  const env = { ...loadEnv({ ...process.env, LOG_LEVEL: 'silent', RATE_LIMITS: 'false', UPLOAD_DIR: uploads, ...overrides }), CLIENT_DIST: '' }
  const logger = pino({ level: 'silent' })
  const { db, pool } = createDatabase(env.DATABASE_URL, logger, 4)
  const app = createApp({ env, db, pool, logger, version: 'test' })
  return { app, db, pool, env, close: () => pool.end() }
}
