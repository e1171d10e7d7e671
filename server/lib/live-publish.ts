import { sql } from 'drizzle-orm'
import type { Database } from '../db/client'
import { LIVE_CHANNEL, type LiveEvent } from '../../shared/schemas/live'

type Executor = Pick<Database, 'execute'>

/**
 * Announces a change to every server process listening on the database. Called inside the
 * transaction that made the change, PostgreSQL delivers it only when that transaction commits.
 */
export async function publishLive(q: Executor, event: Omit<LiveEvent, 'at'>): Promise<void> {
  const payload = JSON.stringify({ ...event, at: new Date().toISOString() })
  await q.execute(sql`select pg_notify(${LIVE_CHANNEL}, ${payload})`)
}
