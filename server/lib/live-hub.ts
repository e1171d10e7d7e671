import pg from 'pg'
import type { Logger } from 'pino'
import { LIVE_CHANNEL, type LiveEvent, LiveEventSchema } from '../../shared/schemas/live'

export type LiveListener = (event: LiveEvent) => void

export interface LiveHub {
  /** Hears this workshop's events; starts listening on the database if nothing did yet. */
  subscribe(workshopId: string, fn: LiveListener): () => void
  /**
   * Called after the database connection came back: anything committed while it was down was
   * never heard, so listeners should tell their browsers to fetch again.
   */
  onResume(fn: () => void): () => void
  /** Called once when the hub closes (the process is stopping), so open streams can end. */
  onClose(fn: () => void): () => void
  /** Resolves once LISTEN is in place, so anything committed afterwards will be heard. */
  ready(): Promise<void>
  /** The database backend holding LISTEN, or null while there is none. */
  readonly backendPid: number | null
  close(): Promise<void>
}

export interface LiveHubOptions {
  connectionString: string
  logger: Logger
  /** First wait before connecting again after the connection is lost; doubles up to maxRetryMs. */
  retryMs?: number
  maxRetryMs?: number
  /** How often the idle connection is checked, so a silently dead one is noticed. */
  pingMs?: number
}

/**
 * One database connection per process listens for live events and hands each to the browsers of
 * its workshop. Every process has its own, so an event committed through any process reaches the
 * browsers connected to all of them. Nothing connects until the first subscriber or ready().
 */
export function createLiveHub(options: LiveHubOptions): LiveHub {
  const { connectionString, logger } = options
  const retryMs = options.retryMs ?? 500
  const maxRetryMs = options.maxRetryMs ?? 15_000
  const pingMs = options.pingMs ?? 30_000

  const byWorkshop = new Map<string, Set<LiveListener>>()
  const resumeListeners = new Set<() => void>()
  const closeListeners = new Set<() => void>()
  let waiters: { resolve: () => void; reject: (err: Error) => void }[] = []

  let client: pg.Client | null = null
  let listening = false
  let started = false
  let closed = false
  let hasListenedBefore = false
  let attempt = 0
  let retryTimer: NodeJS.Timeout | null = null
  let pingTimer: NodeJS.Timeout | null = null

  function deliver(payload: string | undefined) {
    let parsed: unknown
    try {
      parsed = JSON.parse(payload ?? '')
    } catch {
      logger.warn({ bytes: payload?.length ?? 0 }, 'live event ignored: payload is not JSON')
      return
    }
    const result = LiveEventSchema.safeParse(parsed)
    if (!result.success) {
      // The payload may name a customer, so only where it failed is logged.
      logger.warn(
        { issues: result.error.issues.map((i) => ({ path: i.path.join('.'), code: i.code })) },
        'live event ignored: not a valid live event',
      )
      return
    }
    const listeners = byWorkshop.get(result.data.workshopId)
    if (!listeners) return
    for (const fn of [...listeners]) {
      try {
        fn(result.data)
      } catch (err) {
        logger.error({ err }, 'live event listener failed')
      }
    }
  }

  function settleWaiters(err?: Error) {
    const pending = waiters
    waiters = []
    for (const w of pending) {
      if (err) w.reject(err)
      else w.resolve()
    }
  }

  function stopPing() {
    if (pingTimer) clearInterval(pingTimer)
    pingTimer = null
  }

  function startPing(c: pg.Client) {
    stopPing()
    pingTimer = setInterval(() => {
      // A connection cut by a firewall or a failed-over database can look open for hours; a
      // query that does not come back within the interval means it is gone.
      const timeout = setTimeout(() => lost(c, new Error('database did not answer the live connection check')), Math.min(pingMs, 10_000))
      timeout.unref()
      c.query('select 1').then(
        () => clearTimeout(timeout),
        (err: Error) => {
          clearTimeout(timeout)
          lost(c, err)
        },
      )
    }, pingMs)
    pingTimer.unref()
  }

  /** The connection `c` failed; only the current one's failure starts a reconnect. */
  function lost(c: pg.Client, err: Error | undefined) {
    if (c !== client) return
    client = null
    listening = false
    stopPing()
    c.removeAllListeners('notification')
    // Keep a listener: a late 'error' from the dying client must not crash the process.
    c.on('error', () => undefined)
    c.end().catch(() => undefined)
    if (closed) return
    scheduleConnect(err)
  }

  function scheduleConnect(err?: Error) {
    const base = Math.min(maxRetryMs, retryMs * 2 ** attempt)
    // Jitter keeps many processes from reconnecting to a restarted database in the same instant.
    const wait = Math.round(base / 2 + Math.random() * (base / 2))
    attempt += 1
    logger.warn(
      { err: err ? { message: err.message, code: (err as { code?: string }).code } : undefined, retryInMs: wait, attempt },
      hasListenedBefore ? 'live updates connection lost; reconnecting' : 'live updates cannot connect yet; retrying',
    )
    retryTimer = setTimeout(() => {
      retryTimer = null
      void connect()
    }, wait)
    retryTimer.unref()
  }

  async function connect() {
    if (closed) return
    const c = new pg.Client({ connectionString, application_name: 'tickover-live', keepAlive: true, connectionTimeoutMillis: 5_000 })
    client = c
    c.on('error', (err) => lost(c, err))
    c.on('end', () => lost(c, new Error('connection ended')))
    c.on('notification', (msg) => {
      if (msg.channel === LIVE_CHANNEL) deliver(msg.payload)
    })
    try {
      await c.connect()
      await c.query(`LISTEN ${LIVE_CHANNEL}`)
    } catch (err) {
      lost(c, err as Error)
      return
    }
    if (c !== client || closed) return
    listening = true
    attempt = 0
    startPing(c)
    const resumed = hasListenedBefore
    hasListenedBefore = true
    if (resumed) logger.info('live updates connection restored')
    settleWaiters()
    if (resumed) {
      for (const fn of [...resumeListeners]) {
        try {
          fn()
        } catch (e) {
          logger.error({ err: e }, 'live resume listener failed')
        }
      }
    }
  }

  function start() {
    if (started || closed) return
    started = true
    void connect()
  }

  return {
    subscribe(workshopId, fn) {
      let set = byWorkshop.get(workshopId)
      if (!set) {
        set = new Set()
        byWorkshop.set(workshopId, set)
      }
      set.add(fn)
      start()
      return () => {
        const current = byWorkshop.get(workshopId)
        if (!current) return
        current.delete(fn)
        if (current.size === 0) byWorkshop.delete(workshopId)
      }
    },
    onResume(fn) {
      resumeListeners.add(fn)
      return () => resumeListeners.delete(fn)
    },
    onClose(fn) {
      closeListeners.add(fn)
      return () => closeListeners.delete(fn)
    },
    ready() {
      if (closed) return Promise.reject(new Error('live hub is closed'))
      if (listening) return Promise.resolve()
      start()
      return new Promise((resolve, reject) => waiters.push({ resolve, reject }))
    },
    get backendPid() {
      const pid = listening ? (client as unknown as { processID?: number } | null)?.processID : undefined
      return pid ?? null
    },
    async close() {
      if (closed) return
      closed = true
      if (retryTimer) clearTimeout(retryTimer)
      stopPing()
      for (const fn of [...closeListeners]) {
        try {
          fn()
        } catch (err) {
          logger.error({ err }, 'live close listener failed')
        }
      }
      closeListeners.clear()
      byWorkshop.clear()
      resumeListeners.clear()
      settleWaiters(new Error('live hub is closed'))
      const c = client
      client = null
      listening = false
      if (c) {
        c.removeAllListeners('notification')
        c.on('error', () => undefined)
        await c.end().catch(() => undefined)
      }
    },
  }
}
