/**
 * Every API route × every kind of caller → the expected answer, generated from the route table, so a
 * route added without an access rule (or outside the table) fails here.
 */
import type { Express } from 'express'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { can, type StaffRole } from '../../shared/auth/policy'
import type { RouteRule, RouteTable } from '../../server/lib/route-table'
import { starterTemplate } from '../../shared/inspection/starter-template'
import { makeTestApp } from './helpers/app'
import { addCatalogueRecords } from './helpers/catalogue'
import { makeSentEstimate } from './helpers/estimates'
import { type Browser, type Fixture, browser, makeWorkshop, signIn } from './helpers/fixtures'

const t = makeTestApp()
const table = t.app.locals.routeTable as RouteTable

type Caller = 'anonymous' | StaffRole | 'other-owner' | 'customer'
const callers: Caller[] = ['anonymous', 'technician', 'advisor', 'owner', 'other-owner', 'customer']

/** Collects (method, path) of every route Express actually has under /api, nested routers included. */
function expressRoutes(app: Express): { method: string; path: string }[] {
  const found: { method: string; path: string }[] = []
  type Layer = { name?: string; route?: { path: string; methods: Record<string, boolean> }; handle?: { stack?: Layer[] } }
  const walk = (stack: Layer[]) => {
    for (const layer of stack) {
      if (layer.route) {
        for (const [m, on] of Object.entries(layer.route.methods)) if (on && m !== '_all') found.push({ method: m, path: layer.route.path })
      } else if (layer.handle?.stack) walk(layer.handle.stack)
    }
  }
  const top = (app as unknown as { router: { stack: Layer[] } }).router.stack
  walk(top.filter((layer) => layer.name === 'router'))
  return found
}

function expected(rule: RouteRule, caller: Caller): 'allowed' | 401 | 403 | 404 {
  const a = rule.access
  if (a.kind === 'public') return 'allowed'
  if (caller === 'anonymous') return 401
  if (a.kind === 'signed-in') return 'allowed'
  if (a.kind === 'customer') return caller === 'customer' ? 'allowed' : 403
  if (caller === 'customer') return 403
  const role: StaffRole = caller === 'other-owner' ? 'owner' : caller
  if (!can(role, a.permission)) return 403
  // Another workshop's record by id is simply not there.
  if (caller === 'other-owner' && rule.path.includes(':')) return 404
  return 'allowed'
}

/** Skipped for the matrix: requests that would end the caller's own session mid-test. */
const endsSession = (rule: RouteRule) => rule.path === '/auth/sign-out'

/** Event streams never end by themselves: for these the matrix takes the answer's status, then hangs up. */
const streams = new Set(['/live'])
const statusThenHangUp = (b: Browser, path: string) =>
  b.agent
    .get(path)
    .buffer(true)
    .parse((res, done) => {
      ;(res as unknown as { destroy(): void }).destroy()
      done(null, {})
    })

const finding = { title: 'Finding', severity: 'watch', explanation: { what: 'What', why: 'Why', ifLeft: 'If left' } }

/** Bodies that pass validation, built from the caller's own workshop, so only tenancy can refuse them. */
const validBodies: Record<string, (own: Fixture) => object> = {
  'patch /staff/:id/role': () => ({ role: 'advisor' }),
  'put /customers/:id': () => ({ name: 'Renamed', email: 'renamed@fixture.test' }),
  'put /vehicles/:id': (own) => ({ customerId: own.customer.id, registration: 'MX1', make: 'Make', model: 'Model' }),
  'put /jobs/:id': (own) => ({ vehicleId: own.vehicle.id, concern: 'Changed concern' }),
  'put /labour-operations/:id': () => ({
    code: 'MATRIX-OP',
    name: 'Matrix',
    system: 'steering',
    side: 'none',
    bookHours: '1',
    category: 'standard',
  }),
  'post /labour-operations/:id/clock-times': () => ({ hours: '1' }),
  'put /access-steps/:id': () => ({ code: 'MATRIX-STEP', name: 'Matrix', hours: '0.5' }),
  'put /parts/:id': () => ({ partNumber: 'MATRIX-PART', description: 'Matrix', costMinor: 100 }),
  'post /check-templates/:id/copy': () => ({ name: 'Copy' }),
  'put /check-templates/:id': () => ({ name: 'Edited', definition: { checks: starterTemplate.definition.checks.slice(0, 1) } }),
  'post /jobs/:id/findings': () => finding,
  'put /findings/:id': () => finding,
  'put /inspections/:id/safety': () => ({
    standsOnFirmLevelGround: true,
    atLiftingPoints: true,
    wheelsChocked: true,
    notOnJackAlone: true,
    standCapacityKg: 3000,
    capacityBasis: 'per-pair',
    standCount: 2,
    axleLoadKg: 1500,
  }),
  'put /inspections/:id/results': () => ({ checkCode: 'swivel-leak', position: 'left', value: { kind: 'choice', value: 'leak' } }),
  'put /inspections/:id/notes': () => ({ notes: 'Noted' }),
  'post /estimates/:id/questions/:questionId/answer': () => ({ answer: 'Matrix answer' }),
  'put /estimates/:id/draft': () => ({
    revision: 0,
    draft: { items: [], taxMode: 'exclusive', taxRounding: 'per-line', deposit: { kind: 'none' }, expiresOn: '2027-01-01' },
  }),
  'post /estimates/:id/findings': () => ({ revision: 0, findingIds: ['00000000-0000-4000-8000-000000000000'] }),
  'post /estimates/:id/send': () => ({ revision: 0 }),
}

let home: Fixture
let away: Fixture
let homeCatalogue: Awaited<ReturnType<typeof addCatalogueRecords>>
let homeEstimate: Awaited<ReturnType<typeof makeSentEstimate>>
const sessions = new Map<Caller, Browser>()

beforeAll(async () => {
  home = await makeWorkshop(t.db, 'Matrix Home')
  away = await makeWorkshop(t.db, 'Matrix Away')
  homeCatalogue = await addCatalogueRecords(t.db, home)
  homeEstimate = await makeSentEstimate(t.db, home)
  sessions.set('anonymous', browser(t.app))
  sessions.set('technician', await signIn(t.app, home.technician.email))
  sessions.set('advisor', await signIn(t.app, home.advisor.email))
  sessions.set('owner', await signIn(t.app, home.owner.email))
  sessions.set('other-owner', await signIn(t.app, away.owner.email))
  sessions.set('customer', await signIn(t.app, home.customer.email ?? '', 'customer'))
}, 60_000)

afterAll(() => t.close())

function concretePath(rule: RouteRule): string {
  // Ids point at the home workshop's records; the technician is the target of staff changes.
  const ids: Record<string, string> = {
    staff: home.technician.id,
    customers: home.customer.id,
    vehicles: home.vehicle.id,
    jobs: home.job.id,
    'labour-operations': homeCatalogue.operation,
    'access-steps': homeCatalogue.step,
    parts: homeCatalogue.part,
    portal: homeEstimate.estimate.id,
    estimates: homeEstimate.estimate.id,
  }
  const area = rule.path.split('/')[1] ?? ''
  return `/api${rule.path}`
    .replace(':id', ids[area] ?? '00000000-0000-4000-8000-000000000000')
    .replace(':questionId', '00000000-0000-4000-8000-000000000000')
    .replace(':emailId', '00000000-0000-4000-8000-000000000000')
    .replace(':version', '1')
}

describe('the route table covers every route', () => {
  it('has a rule for each route Express serves, and no rule without a route', () => {
    const served = expressRoutes(t.app)
      .map((r) => `${r.method.toUpperCase()} ${r.path}`)
      .sort()
    const ruled = table.rules.map((r) => `${r.method.toUpperCase()} ${r.localPath}`).sort()
    expect(table.rules.length).toBeGreaterThan(10)
    expect(served).toEqual(ruled)
  })
})

describe('access matrix', () => {
  for (const caller of callers) {
    it(`answers ${caller} as the rules say on every route`, async () => {
      const b = sessions.get(caller)
      if (!b) throw new Error(`no session for ${caller}`)
      const failures: string[] = []
      for (const rule of table.rules) {
        if (endsSession(rule) && caller !== 'anonymous') continue
        const path = concretePath(rule)
        // Empty bodies: an allowed write gets past the guard and stops at validation (422), changing nothing.
        // The other workshop's owner sends a valid body, so only the record's absence can stop them.
        const body = caller === 'other-owner' ? (validBodies[`${rule.method} ${rule.path}`]?.(away) ?? {}) : {}
        const res =
          rule.method === 'get'
            ? await (streams.has(rule.path) ? statusThenHangUp(b, path) : b.get(path))
            : await b[rule.method](path, body)
        const want = expected(rule, caller)
        const ok = want === 'allowed' ? ![401, 403].includes(res.status) && res.status < 500 : res.status === want
        if (!ok) failures.push(`${rule.method.toUpperCase()} ${path}: expected ${want}, got ${res.status} ${JSON.stringify(res.body)}`)
      }
      expect(failures).toEqual([])
    })
  }
})
