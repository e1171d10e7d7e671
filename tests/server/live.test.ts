import { randomBytes, randomUUID } from 'node:crypto'
import { Writable } from 'node:stream'
import { sql } from 'drizzle-orm'
import express from 'express'
import pino from 'pino'
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest'
import { type LiveHub, createLiveHub } from '../../server/lib/live-hub'
import { publishLive } from '../../server/lib/live-publish'
import { RouteTable } from '../../server/lib/route-table'
import { errorHandler } from '../../server/middleware/errors'
import { liveRoutes } from '../../server/modules/live/live.routes'
import type { LiveEvent } from '../../shared/schemas/live'
import { makeTestApp } from './helpers/app'
import { type Fixture, makeWorkshop } from './helpers/fixtures'
import { type LiveStream, listen, openLiveStream, signInCookie } from './helpers/live'

// Two server processes on one database; they must share the secret that signs session cookies.
const secret = randomBytes(32).toString('base64url')
const one = makeTestApp({ AUTH_SECRET: secret })
const two = makeTestApp({ AUTH_SECRET: secret })

let urlOne = ''
let urlTwo = ''
const stops: (() => Promise<void>)[] = []
const streams: LiveStream[] = []

let home: Fixture
let away: Fixture
let advisorCookie = ''

async function open(baseUrl: string, cookie = advisorCookie) {
  const s = await openLiveStream(baseUrl, cookie)
  streams.push(s)
  return s
}

function estimateEvent(workshopId: string, type: LiveEvent['type'] = 'estimate.decision') {
  return { type, workshopId, estimateId: randomUUID(), status: 'sent' as const, summary: 'Item 2 approved' }
}

/** Commits an event the way a service does: pg_notify inside the transaction that made the change. */
async function commit(event: Omit<LiveEvent, 'at'>, db = one.db) {
  await db.transaction(async (tx) => {
    await publishLive(tx, event)
  })
}

beforeAll(async () => {
  const [a, b] = await Promise.all([listen(one.app), listen(two.app)])
  urlOne = a.baseUrl
  urlTwo = b.baseUrl
  stops.push(a.close, b.close)
  home = await makeWorkshop(one.db, 'Live Home')
  away = await makeWorkshop(one.db, 'Live Away')
  advisorCookie = await signInCookie(one.app, home.advisor.email)
}, 60_000)

afterAll(async () => {
  for (const s of streams) s.close()
  await Promise.all(stops.map((stop) => stop()))
  await Promise.all([one.close(), two.close()])
})

describe('GET /api/live', () => {
  it('answers as an event stream that nothing in between should buffer', async () => {
    const ctrl = new AbortController()
    const res = await fetch(`${urlOne}/api/live`, { headers: { cookie: advisorCookie }, signal: ctrl.signal })
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toMatch(/^text\/event-stream/)
    expect(res.headers.get('cache-control')).toBe('no-cache, no-transform')
    expect(res.headers.get('x-accel-buffering')).toBe('no')
    expect(res.headers.get('content-encoding')).toBeNull()
    const reader = res.body!.getReader()
    const first = await reader.read()
    expect(new TextDecoder().decode(first.value)).toBe('retry: 3000\n\n')
    ctrl.abort()
  })

  it('delivers an event committed through one process to the workshop’s streams on both processes', async () => {
    const [onOne, onTwo] = await Promise.all([open(urlOne), open(urlTwo)])
    const event = estimateEvent(home.workshop.id)
    await commit(event)
    const got = await Promise.all([onOne, onTwo].map((s) => s.waitFor((e) => e.estimateId === event.estimateId)))
    for (const e of got) {
      expect(e).toMatchObject(event)
      expect(Number.isNaN(Date.parse(e.at))).toBe(false)
    }
    // And the other way round: committed through the second process's pool.
    const back = estimateEvent(home.workshop.id, 'estimate.opened')
    await commit(back, two.db)
    await Promise.all([onOne, onTwo].map((s) => s.waitFor((e) => e.estimateId === back.estimateId)))
  })

  it('never delivers an event whose transaction rolled back', async () => {
    const [onOne, onTwo] = await Promise.all([open(urlOne), open(urlTwo)])
    const undone = estimateEvent(home.workshop.id)
    await expect(
      one.db.transaction(async (tx) => {
        await publishLive(tx, undone)
        tx.rollback()
      }),
    ).rejects.toThrow()
    // Notifications arrive in commit order, so once a later one is here the undone one never will be.
    const later = estimateEvent(home.workshop.id)
    await commit(later)
    for (const s of [onOne, onTwo]) {
      await s.waitFor((e) => e.estimateId === later.estimateId)
      expect(s.events.map((e) => e.estimateId)).not.toContain(undone.estimateId)
    }
  })

  it('keeps each workshop’s events to its own staff', async () => {
    const awayCookie = await signInCookie(two.app, away.owner.email)
    const [homeStream, awayStream] = await Promise.all([open(urlOne), open(urlTwo, awayCookie)])
    const theirs = estimateEvent(away.workshop.id)
    await commit(theirs)
    const ours = estimateEvent(home.workshop.id)
    await commit(ours)
    await homeStream.waitFor((e) => e.estimateId === ours.estimateId)
    await awayStream.waitFor((e) => e.estimateId === theirs.estimateId)
    expect(homeStream.events.map((e) => e.estimateId)).not.toContain(theirs.estimateId)
    expect(awayStream.events.map((e) => e.estimateId)).not.toContain(ours.estimateId)
  })

  it('refuses a technician (403) and a signed-out caller (401)', async () => {
    const techCookie = await signInCookie(one.app, home.technician.email)
    await expect(openLiveStream(urlOne, techCookie)).rejects.toMatchObject({ status: 403 })
    await expect(openLiveStream(urlTwo, techCookie)).rejects.toMatchObject({ status: 403 })
    await expect(openLiveStream(urlOne, '')).rejects.toMatchObject({ status: 401 })
    const res = await fetch(`${urlOne}/api/live`, { headers: { cookie: techCookie } })
    expect(res.status).toBe(403)
    expect(((await res.json()) as { error: { code: string } }).error.code).toBe('forbidden')
  })

  it('stops listening for a stream once the browser closes it', async () => {
    const unsubscribed = vi.fn()
    const real = one.liveHub.subscribe.bind(one.liveHub)
    const spy = vi.spyOn(one.liveHub, 'subscribe').mockImplementation((workshopId, fn) => {
      const off = real(workshopId, fn)
      return () => {
        unsubscribed(workshopId)
        off()
      }
    })
    try {
      const s = await open(urlOne)
      expect(spy).toHaveBeenCalledWith(home.workshop.id, expect.any(Function))
      s.close()
      await vi.waitFor(() => expect(unsubscribed).toHaveBeenCalledWith(home.workshop.id), { timeout: 5_000 })
    } finally {
      spy.mockRestore()
    }
  })

  it('carries on after the database connection behind each process’s listener is cut', async () => {
    const [onOne, onTwo] = await Promise.all([open(urlOne), open(urlTwo)])
    const pids = [one.liveHub.backendPid, two.liveHub.backendPid]
    expect(pids.every((p) => typeof p === 'number')).toBe(true)
    const killed = await one.db.execute<{ killed: boolean }>(
      sql`select pg_terminate_backend(pid) as killed from pg_stat_activity where pid in (${pids[0]}, ${pids[1]}) and application_name = 'tickover-live'`,
    )
    expect(killed.rows.map((r) => r.killed)).toEqual([true, true])

    // Each listener tells its streams it was away, so browsers fetch what they show again.
    await Promise.all([onOne.waitForResync(1), onTwo.waitForResync(1)])
    expect(one.liveHub.backendPid).not.toBe(pids[0])
    expect(two.liveHub.backendPid).not.toBe(pids[1])

    const event = estimateEvent(home.workshop.id, 'estimate.confirmed')
    await commit(event)
    await Promise.all([onOne, onTwo].map((s) => s.waitFor((e) => e.estimateId === event.estimateId)))
  })
})

/** Only the live route, with the advisor already signed in, so its timings can be shortened. */
function bareLiveApp(hub: LiveHub, options: Parameters<typeof liveRoutes>[2]) {
  const table = new RouteTable()
  const app = express()
  app.use((req, _res, next) => {
    const { advisor, workshop } = home
    req.user = {
      kind: 'staff',
      id: advisor.id,
      name: advisor.name,
      email: advisor.email,
      role: 'advisor',
      workshop: { id: workshop.id, name: workshop.name, currency: 'GBP', timezone: 'Europe/London' },
    }
    req.log = pino({ level: 'silent' })
    next()
  })
  const g = liveRoutes(table, hub, options)
  app.use(`/api${g.base}`, g.router)
  app.use(errorHandler)
  return app
}

describe('the live route’s limits', () => {
  it('refuses a stream (503) rather than hold it open unheard while the database cannot be reached', async () => {
    // Port 1 on loopback: nothing listens there, so the listener can never start.
    const deadHub = createLiveHub({
      connectionString: 'postgres://nobody@127.0.0.1:1/none_test',
      logger: pino({ level: 'silent' }),
      retryMs: 50,
      maxRetryMs: 100,
    })
    const server = await listen(bareLiveApp(deadHub, { readyTimeoutMs: 300 }))
    try {
      const res = await fetch(`${server.baseUrl}/api/live`)
      expect(res.status).toBe(503)
      expect(((await res.json()) as { error: { code: string } }).error.code).toBe('live_unavailable')
    } finally {
      await server.close()
      await deadHub.close()
    }
  })

  it('lets a stream go after its lifetime, so the browser reconnects through the session check', async () => {
    const server = await listen(bareLiveApp(one.liveHub, { maxStreamMs: 300 }))
    try {
      const started = Date.now()
      const res = await fetch(`${server.baseUrl}/api/live`)
      expect(res.status).toBe(200)
      expect(await res.text()).toBe('retry: 3000\n\n')
      expect(Date.now() - started).toBeGreaterThanOrEqual(250)
    } finally {
      await server.close()
    }
  })
})

describe('the live hub', () => {
  it('ignores and logs payloads that are not live events, and still delivers the good ones', async () => {
    const lines: { level: number; msg: string }[] = []
    const sink = new Writable({
      write(chunk: Buffer, _enc, done) {
        lines.push(JSON.parse(chunk.toString()) as { level: number; msg: string })
        done()
      },
    })
    const hub = createLiveHub({ connectionString: one.env.DATABASE_URL, logger: pino({ level: 'warn' }, sink) })
    try {
      const workshopId = randomUUID()
      const heard: LiveEvent[] = []
      hub.subscribe(workshopId, (e) => heard.push(e))
      await hub.ready()
      await one.db.execute(sql`select pg_notify('tickover_live', 'not json at all')`)
      await one.db.execute(
        sql`select pg_notify('tickover_live', ${JSON.stringify({ type: 'estimate.exploded', workshopId, estimateId: randomUUID(), at: 'now' })})`,
      )
      const good = estimateEvent(workshopId)
      await commit(good)
      await vi.waitFor(() => expect(heard.map((e) => e.estimateId)).toEqual([good.estimateId]), { timeout: 5_000 })
      expect(lines.map((l) => l.msg)).toEqual(['live event ignored: payload is not JSON', 'live event ignored: not a valid live event'])
    } finally {
      await hub.close()
    }
  })

  it('refuses to wait once closed', async () => {
    const hub = createLiveHub({ connectionString: one.env.DATABASE_URL, logger: pino({ level: 'silent' }) })
    const waiting = expect(hub.ready()).rejects.toThrow('closed')
    await hub.close()
    await waiting
    await expect(hub.ready()).rejects.toThrow('closed')
  })
})
