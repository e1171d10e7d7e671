import { drizzle } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import type { Logger } from 'pino'
import * as schema from './schema'

export type Database = ReturnType<typeof createDatabase>['db']

export function createDatabase(url: string, logger: Logger, max = 10) {
  const pool = new pg.Pool({ connectionString: url, max, connectionTimeoutMillis: 3000, idleTimeoutMillis: 30_000 })
  // An idle client's connection dying (a database restart) is emitted here; without a listener it would crash the process.
  pool.on('error', (err) => logger.warn({ err: { message: err.message } }, 'idle database connection lost'))
  const db = drizzle(pool, { schema, casing: 'snake_case' })
  return { pool, db }
}

/** A transaction handle, as `db.transaction(async (tx) => …)` passes it. */
export type Tx = Parameters<Parameters<Database['transaction']>[0]>[0]
/** Anything that runs queries: the database itself or a transaction. */
export type Queryable = Database | Tx
