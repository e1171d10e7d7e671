import type { LiveHub } from '../../lib/live-hub'
import { staffWith } from '../../lib/access'
import type { RouteTable } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'

/** Browsers wait this long before reconnecting a dropped stream (sent as the stream's `retry:`). */
export const LIVE_RETRY_MS = 3_000
/** Proxies and load balancers close connections idle for about a minute; a comment keeps this one busy. */
export const LIVE_HEARTBEAT_MS = 25_000
/**
 * A stream is let go after this long and the browser reconnects, passing the session check again:
 * a deactivated account or a changed role stops hearing events within this time.
 */
export const LIVE_MAX_STREAM_MS = 15 * 60_000
/** A stream opened while the database cannot be reached is refused after this long, not held open unheard. */
const READY_TIMEOUT_MS = 10_000

/** The event a stream carries after the server's own database connection came back. */
export const RESYNC_EVENT = 'resync'

function withTimeout(promise: Promise<void>, ms: number): Promise<void> {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error('timed out')), ms)
    promise.then(
      () => {
        clearTimeout(timer)
        resolve()
      },
      (err: unknown) => {
        clearTimeout(timer)
        reject(err instanceof Error ? err : new Error(String(err)))
      },
    )
  })
}

/**
 * Server-Sent Events for staff browsers: what happens to their workshop's estimates, as it happens.
 * The stream opens only once this process is listening on the database, so anything committed
 * after the browser's `open` event reaches it.
 */
export function liveRoutes(table: RouteTable, hub: LiveHub, options: { maxStreamMs?: number; readyTimeoutMs?: number } = {}) {
  const maxStreamMs = options.maxStreamMs ?? LIVE_MAX_STREAM_MS
  const readyTimeoutMs = options.readyTimeoutMs ?? READY_TIMEOUT_MS
  const g = table.group('/live')
  g.get('', staffWith('estimates:read'), async (req, res) => {
    const me = staffOf(req)
    try {
      await withTimeout(hub.ready(), readyTimeoutMs)
    } catch (err) {
      req.log.warn({ err: { message: (err as Error).message } }, 'live stream refused: not listening on the database')
      res.status(503).json({ error: { code: 'live_unavailable', message: 'Live updates are not available right now.' } })
      return
    }
    if (res.closed) return

    res.status(200).set({
      'Content-Type': 'text/event-stream; charset=utf-8',
      // no-transform keeps compressing proxies from holding events back to fill a block.
      'Cache-Control': 'no-cache, no-transform',
      // nginx buffers responses unless told not to.
      'X-Accel-Buffering': 'no',
    })
    res.flushHeaders()
    res.write(`retry: ${LIVE_RETRY_MS}\n\n`)

    let counter = 0
    const send = (type: string, data: unknown) => {
      counter += 1
      res.write(`id: ${counter}\nevent: ${type}\ndata: ${JSON.stringify(data)}\n\n`)
    }
    const unsubscribe = hub.subscribe(me.workshop.id, (event) => send(event.type, event))
    const offResume = hub.onResume(() => send(RESYNC_EVENT, {}))
    const offClose = hub.onClose(() => res.end())
    const heartbeat = setInterval(() => res.write(': keep-alive\n\n'), LIVE_HEARTBEAT_MS)
    const lifetime = setTimeout(() => res.end(), maxStreamMs)

    res.on('close', () => {
      clearInterval(heartbeat)
      clearTimeout(lifetime)
      unsubscribe()
      offResume()
      offClose()
    })
  })
  return g
}
