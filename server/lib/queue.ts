import pg from 'pg'
import PgBoss from 'pg-boss'
import type { Logger } from 'pino'

/** The PostgreSQL schema pg-boss keeps its tables in. */
export const QUEUE_SCHEMA = 'pgboss'

export interface JobQueue {
  /** The current pg-boss instance (a new one replaces it when a start fails, see start()). */
  readonly boss: PgBoss
  /** Connects and installs pg-boss's tables; safe to call many times and again after a failure. */
  start(): Promise<void>
  /** Creates a named queue once per process, after start(). */
  declare(name: string, options?: Omit<PgBoss.Queue, 'name'>): Promise<void>
  /** Lets running jobs finish (up to timeoutMs), then closes the queue's connections. */
  stop(timeoutMs?: number): Promise<void>
}

export interface QueueOptions {
  /** Connections the queue may hold; it needs at least two (one holds the lock in declare()). */
  max?: number
}

/**
 * One pg-boss for the process, on a connection pool of its own so background work never
 * waits for the web requests' connections.
 */
export function createQueue(connectionString: string, logger: Logger, options: QueueOptions = {}): JobQueue {
  const pool = new pg.Pool({
    connectionString,
    max: Math.max(2, options.max ?? 4),
    connectionTimeoutMillis: 5000,
    application_name: 'tickover-queue',
  })
  pool.on('error', (err) => logger.warn({ err: { message: err.message } }, 'idle queue connection lost'))
  const executor: PgBoss.Db = { executeSql: (text, values) => pool.query(text, values) }

  const makeBoss = () => {
    // schedule off: pg-boss would otherwise create and poll a cron queue nobody here uses.
    const boss = new PgBoss({ db: executor, schema: QUEUE_SCHEMA, schedule: false, supervise: true })
    boss.on('error', (err) => logger.warn({ err: { message: err.message } }, 'job queue error'))
    return boss
  }
  let boss = makeBoss()
  let starting: Promise<void> | undefined
  let stopped = false
  const declared = new Map<string, Promise<void>>()

  function start(): Promise<void> {
    if (stopped) return Promise.reject(new Error('The job queue has been stopped'))
    starting ??= boss.start().then(
      () => undefined,
      (err: unknown) => {
        // pg-boss refuses a second start() on an instance whose first start failed, so the next try gets a fresh one.
        starting = undefined
        boss = makeBoss()
        throw err
      },
    )
    return starting
  }

  async function createQueueOnce(name: string, queueOptions: Omit<PgBoss.Queue, 'name'>) {
    await start()
    if (await boss.getQueue(name)) return
    // pg-boss creates a queue's partition with DDL that deadlocks when two processes create
    // different queues at the same moment (parallel test files do), so creation is serialised.
    const client = await pool.connect()
    try {
      await client.query('select pg_advisory_lock(hashtext($1))', ['tickover.pgboss.create-queue'])
      try {
        await boss.createQueue(name, { name, ...queueOptions })
      } finally {
        await client.query('select pg_advisory_unlock(hashtext($1))', ['tickover.pgboss.create-queue'])
      }
    } finally {
      client.release()
    }
  }

  return {
    get boss() {
      return boss
    },
    start,
    declare(name, queueOptions = {}) {
      let done = declared.get(name)
      if (!done) {
        done = createQueueOnce(name, queueOptions)
        declared.set(name, done)
        done.catch(() => declared.delete(name))
      }
      return done
    },
    async stop(timeoutMs = 10_000) {
      if (stopped) return
      stopped = true
      const wasStarted = await starting?.then(
        () => true,
        () => false,
      )
      if (wasStarted)
        await boss
          .stop({ graceful: true, timeout: timeoutMs })
          .catch((err: unknown) => logger.warn({ err }, 'job queue did not stop cleanly'))
      await pool.end().catch(() => undefined)
    },
  }
}
