/**
 * How fast the labour-time lookup answers, through the whole API (session, guard, search,
 * pricing) over a real HTTP listener, against 5,000 operations in one workshop.
 * Target: p95 under 50 ms. The operations are generated, so their names are deliberately
 * repetitive; the queries mix words, synonyms, codes, typos and filters as an advisor types them.
 * Also prints how long the 5,000-row CSV import takes (dry run, then commit).
 */
import type { AddressInfo } from 'node:net'
import pino from 'pino'
import { startTestServices } from '../../docker-free-dev/lib/test-services'
import { createApp } from '../../server/app'
import { createDatabase } from '../../server/db/client'
import { staffUsers, workshops } from '../../server/db/schema'
import { loadEnv } from '../../server/env'
import { createQueue } from '../../server/lib/queue'
import { createEmailOutbox } from '../../server/modules/email/outbox'
import { linkIn, waitForMail } from '../server/helpers/mail'
import { formatMs, measure } from './stats'

const OPERATIONS = 5000
const QUERIES = 200

const components: [string, string, string[]][] = [
  ['front differential', 'front_axle', ['diff']],
  ['rear differential', 'rear_axle', ['diff']],
  ['swivel housing seal', 'front_axle', ['swivel ball seal']],
  ['swivel pin bearings', 'front_axle', ['kingpin bearings']],
  ['CV joint', 'front_axle', ['constant velocity joint']],
  ['front half shaft', 'front_axle', ['axle shaft']],
  ['rear half shaft', 'rear_axle', ['halfshaft']],
  ['pinion oil seal', 'rear_axle', ['pinion seal']],
  ['rear hub oil seal', 'rear_axle', ['hub seal']],
  ['front prop shaft universal joint', 'prop_shafts', ['UJ']],
  ['rear prop shaft universal joint', 'prop_shafts', ['UJ']],
  ['prop shaft centre bearing', 'prop_shafts', ['carrier bearing']],
  ['prop shaft sliding joint', 'prop_shafts', ['slider']],
  ['transfer box output bearing', 'transfer_box', ['output bearing']],
  ['centre differential lock', 'transfer_box', ['diff lock']],
  ['transfer box chain', 'transfer_box', []],
  ['track rod end', 'steering', ['TRE']],
  ['drag link', 'steering', []],
  ['steering damper', 'steering', []],
  ['steering box', 'steering', []],
  ['panhard rod bushes', 'steering', []],
  ['front wheel bearing', 'hubs_bearings', ['hub bearing']],
  ['rear wheel bearing', 'hubs_bearings', ['hub bearing']],
  ['free-wheeling hub', 'hubs_bearings', ['locking hub']],
  ['stub axle', 'hubs_bearings', []],
]
const actions = ['Replace', 'Overhaul', 'Inspect', 'Adjust', 'Reseal', 'Remove and refit', 'Diagnose noise from', 'Clean and grease']
const qualifiers = [
  '',
  'heavy duty',
  'long wheelbase',
  'short wheelbase',
  'twin cab',
  'early type',
  'late type',
  'with ABS ring',
  'export model',
  'with winch',
  'raised suspension',
  'pre-facelift',
  'facelift',
  'ex-fleet',
  'lifted',
  'stock height',
  'with locker',
  'without locker',
  'diesel',
  'petrol',
  'auto box',
  'manual box',
  'crew cab',
  'utility body',
  'hard top',
]
const sides = ['left', 'right', 'both', 'none'] as const
const groups = ['coil-sprung-live-axle', 'leaf-sprung-pickup', 'independent-front', '']

function csvCell(v: string): string {
  return /[",\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v
}

function operationsCsv(): string {
  const lines = ['code,name,synonyms,system,vehicle_groups,side,book_hours,category,access_steps,notes']
  for (let i = 0; i < OPERATIONS; i++) {
    const [component, system, synonyms] = components[i % components.length] as [string, string, string[]]
    const action = actions[Math.floor(i / components.length) % actions.length] as string
    const qualifier = qualifiers[Math.floor(i / (components.length * actions.length)) % qualifiers.length] as string
    const name = `${action} ${component}${qualifier ? `, ${qualifier}` : ''}`
    const hours = `${1 + (i % 7)}.${i % 10}`
    lines.push(
      [
        `BX-${String(i).padStart(4, '0')}`,
        name,
        synonyms.join('|'),
        system,
        groups[i % groups.length] ?? '',
        sides[i % sides.length] ?? 'none',
        hours,
        'standard',
        '',
        '',
      ]
        .map(csvCell)
        .join(','),
    )
  }
  return `${lines.join('\n')}\n`
}

/** A small deterministic generator, so every run asks the same 200 questions. */
function* queries(): Generator<string> {
  const words = [
    'UJ',
    'diff',
    'swivle',
    'swivel seal',
    'hub bearing',
    'front diff',
    'rear diff',
    'cv joint',
    'pinion seal',
    'transfer box output',
    'steering damper',
    'halfshaft',
    'bearng',
    'prop shaft',
    'track rod',
    'TRE',
    'kingpin',
    'diff lock',
    'overhaul',
    'sliding',
    'centre bearing',
    'drag link',
    'wheel bearing heavy duty',
    'replace swivel',
    'stub axle',
    'panhard',
    'free wheeling hub',
    'dampr',
    'transfr box',
    'unversal joint',
  ]
  let seed = 7
  const next = () => (seed = (seed * 1103515245 + 12345) % 2 ** 31)
  for (;;) {
    const r = next() % 10
    const params = new URLSearchParams()
    if (r < 2) params.set('q', `BX-${String(next() % OPERATIONS).padStart(4, '0')}`)
    else params.set('q', words[next() % words.length] as string)
    if (r === 3) params.set('vehicleGroup', 'coil-sprung-live-axle')
    if (r === 4) params.set('side', 'left')
    if (r === 5) params.set('system', 'front_axle')
    yield params.toString()
  }
}

export default async function () {
  const services = await startTestServices()
  Object.assign(process.env, services.env)
  const env = { ...loadEnv({ ...process.env, LOG_LEVEL: 'silent', RATE_LIMITS: 'false' }), CLIENT_DIST: '' }
  const logger = pino({ level: 'silent' })
  const { db, pool } = createDatabase(env.DATABASE_URL, logger, 10)
  // The lookup sends no outbox mail, so no e-mail worker runs here.
  const jobs = createQueue(env.DATABASE_URL, logger)
  const server = createApp({ env, db, pool, logger, version: 'bench', outbox: createEmailOutbox({ db, jobs }) }).listen(0, '127.0.0.1')
  await new Promise((resolve) => server.once('listening', resolve))
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`
  const origin = new URL(env.PUBLIC_BASE_URL).origin
  try {
    const [shop] = await db.insert(workshops).values({ name: 'Bench Works' }).returning()
    if (!shop) throw new Error('no workshop')
    const email = 'owner@bench.test'
    await db.insert(staffUsers).values({ workshopId: shop.id, name: 'Bench Owner', email, role: 'owner' })

    const since = Date.now()
    await fetch(`${base}/api/auth/staff/link`, {
      method: 'POST',
      headers: { Origin: origin, 'Content-Type': 'application/json' },
      body: JSON.stringify({ email }),
    })
    const token = linkIn(await waitForMail(email, { since })).searchParams.get('token') ?? ''
    const verified = await fetch(`${base}/api/auth/verify`, {
      method: 'POST',
      headers: { Origin: origin, 'Content-Type': 'application/json' },
      body: JSON.stringify({ token }),
    })
    const cookie = (verified.headers.getSetCookie()[0] ?? '').split(';')[0] ?? ''
    if (!verified.ok || !cookie) throw new Error(`sign-in failed: ${verified.status}`)

    await fetch(`${base}/api/pricing`, {
      method: 'PUT',
      headers: { Origin: origin, Cookie: cookie, 'Content-Type': 'application/json' },
      body: JSON.stringify({ rates: { standard: 8000, diagnostic: 9000, specialist: 11000 }, defaultTaxRate: '20', markupBands: [] }),
    })

    const file = operationsCsv()
    const upload = async (path: string) => {
      const start = process.hrtime.bigint()
      const res = await fetch(`${base}${path}`, {
        method: 'POST',
        headers: { Origin: origin, Cookie: cookie, 'Content-Type': 'text/csv' },
        body: file,
      })
      const body = (await res.json()) as { summary?: { added: number } }
      if (!res.ok) throw new Error(`${path} answered ${res.status}`)
      return { ms: Number(process.hrtime.bigint() - start) / 1e6, added: body.summary?.added ?? 0 }
    }
    const dry = await upload('/api/labour-operations/import/dry-run')
    const commit = await upload('/api/labour-operations/import')
    console.log(`import of ${commit.added.toLocaleString('en-GB')} operations: dry run ${formatMs(dry.ms)}, commit ${formatMs(commit.ms)}`)
    await pool.query('analyze')

    const asked = queries()
    let answered = 0
    const times = await measure(async () => {
      const q = asked.next().value as string
      const res = await fetch(`${base}/api/labour-operations?${q}`, { headers: { Cookie: cookie, Accept: 'application/json' } })
      if (!res.ok) throw new Error(`search ${q} answered ${res.status}`)
      const body = (await res.json()) as { items: unknown[] }
      if (body.items.length > 0) answered++
    }, QUERIES)
    console.log(
      `lookup over ${OPERATIONS.toLocaleString('en-GB')} operations, ${QUERIES} queries: median ${formatMs(times.median)}, p95 ${formatMs(times.p95)}, max ${formatMs(times.max)} (target p95 < 50 ms)`,
    )
    console.log(`queries with at least one result: ${answered} of ${QUERIES + 20} (including warm-up)`)
    // The floor under every lookup on this machine: session, sign-in check and one small query.
    const floor = await measure(() => fetch(`${base}/api/pricing`, { headers: { Cookie: cookie } }).then((r) => r.json()), QUERIES)
    console.log(`for comparison, GET /api/pricing: median ${formatMs(floor.median)}, p95 ${formatMs(floor.p95)}`)
  } finally {
    await new Promise((resolve) => server.close(resolve))
    await jobs.stop()
    await pool.end()
    await services.stop()
  }
}
