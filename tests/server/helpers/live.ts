import type { AddressInfo } from 'node:net'
import type { Express } from 'express'
import { EventSource } from 'eventsource'
import request from 'supertest'
import { type LiveEvent, LiveEventSchema } from '../../../shared/schemas/live'
import { linkIn, waitForMail } from './mail'

export interface LiveStream {
  /** Every live event received so far, oldest first. */
  readonly events: LiveEvent[]
  /** How many times the server said its database listener came back (events may have been missed). */
  readonly resyncs: number
  /** The first event (already received or still to come) that matches; rejects after timeoutMs. */
  waitFor(pred: (event: LiveEvent) => boolean, timeoutMs?: number): Promise<LiveEvent>
  /** Resolves when the server has sent `count` resync signals in all. */
  waitForResync(count?: number, timeoutMs?: number): Promise<void>
  close(): void
}

/** An app listening on a free loopback port, as one server process of several. */
export async function listen(app: Express): Promise<{ baseUrl: string; close: () => Promise<void> }> {
  const server = app.listen(0, '127.0.0.1')
  await new Promise<void>((resolve, reject) => {
    server.once('listening', resolve)
    server.once('error', reject)
  })
  const { port } = server.address() as AddressInfo
  return {
    baseUrl: `http://127.0.0.1:${port}`,
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve())
        server.closeAllConnections()
      }),
  }
}

/** Signs in by e-mail link like signIn() does, and returns the session cookie (`name=value`) for other clients. */
export async function signInCookie(app: Express, email: string, audience: 'staff' | 'customer' = 'staff'): Promise<string> {
  const origin = 'http://127.0.0.1:3000'
  const since = Date.now()
  await request(app).post(`/api/auth/${audience}/link`).set('Origin', origin).send({ email }).expect(202)
  const token = linkIn(await waitForMail(email, { since })).searchParams.get('token') ?? ''
  const res = await request(app).post('/api/auth/verify').set('Origin', origin).send({ token }).expect(200)
  const name = app.get('session cookie name') as string
  const setCookie = ([] as string[]).concat(res.headers['set-cookie'] ?? [])
  const cookie = setCookie.map((c) => c.split(';')[0] ?? '').find((c) => c.startsWith(`${name}=`))
  if (!cookie) throw new Error(`sign-in answered without a ${name} cookie`)
  return cookie
}

const liveTypes = LiveEventSchema.shape.type.options

/**
 * Opens GET /api/live as a browser would (the `eventsource` package, with the session cookie), and
 * resolves once the stream is open, when the server is already listening on the database.
 */
export async function openLiveStream(baseUrl: string, cookie: string, openTimeoutMs = 10_000): Promise<LiveStream> {
  const source = new EventSource(`${baseUrl}/api/live`, {
    fetch: (input, init) => fetch(input, { ...init, headers: { ...init.headers, cookie } }),
  })
  const events: LiveEvent[] = []
  let resyncs = 0
  const waiters = new Set<() => void>()
  const wake = () => {
    for (const w of [...waiters]) w()
  }

  for (const type of liveTypes) {
    source.addEventListener(type, (e) => {
      events.push(LiveEventSchema.parse(JSON.parse((e as MessageEvent<string>).data)))
      wake()
    })
  }
  source.addEventListener('resync', () => {
    resyncs += 1
    wake()
  })

  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => {
      source.close()
      reject(new Error(`live stream at ${baseUrl} did not open within ${openTimeoutMs} ms`))
    }, openTimeoutMs)
    source.onopen = () => {
      clearTimeout(timer)
      resolve()
    }
    source.onerror = (e) => {
      // A refusal (401, 403, 503) closes the source for good; a dropped stream reconnects by itself.
      if (source.readyState === source.CLOSED) {
        clearTimeout(timer)
        reject(Object.assign(new Error(`live stream refused: ${e.code ?? '?'} ${e.message ?? ''}`), { status: e.code }))
      }
    }
  })

  const until = <T>(check: () => T | undefined, timeoutMs: number, what: string) =>
    new Promise<T>((resolve, reject) => {
      const attempt = () => {
        const found = check()
        if (found === undefined) return false
        waiters.delete(attempt)
        clearTimeout(timer)
        resolve(found)
        return true
      }
      const timer = setTimeout(() => {
        waiters.delete(attempt)
        reject(new Error(`${what} did not arrive within ${timeoutMs} ms; received: ${JSON.stringify(events.map((e) => e.type))}`))
      }, timeoutMs)
      if (!attempt()) waiters.add(attempt)
    })

  return {
    events,
    get resyncs() {
      return resyncs
    },
    waitFor: (pred, timeoutMs = 5_000) => until(() => events.find(pred), timeoutMs, 'live event'),
    waitForResync: (count = 1, timeoutMs = 10_000) =>
      until(() => (resyncs >= count ? true : undefined), timeoutMs, 'resync').then(() => undefined),
    close: () => source.close(),
  }
}
