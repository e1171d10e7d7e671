import { randomBytes } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { findings } from '../../server/db/schema'
import { seedCatalogue } from '../../server/db/seed-catalogue'
import { calculateEstimate } from '../../shared/estimate'
import { snapshotToEngineInput, type EstimateDetail } from '../../shared/schemas/estimates'
import type { PortalEstimate } from '../../shared/schemas/portal'
import { makeTestApp } from './helpers/app'
import type { Express } from 'express'
import request from 'supertest'
import { type Fixture, makeWorkshop } from './helpers/fixtures'
import { type LiveStream, listen, openLiveStream, signInCookie } from './helpers/live'
import { linkIn, waitForMail } from './helpers/mail'
import { openLink } from './helpers/portal'

// Two server processes on one database, sharing the secret that signs session cookies.
const secret = randomBytes(32).toString('base64url')
const one = makeTestApp({ AUTH_SECRET: secret })
const two = makeTestApp({ AUTH_SECRET: secret })
const stops: (() => Promise<void>)[] = []
const streams: LiveStream[] = []
let shop: Fixture

/** Same-origin requests carrying a session cookie, as the advisor's browser sends them. */
function withCookie(app: Express, cookie: string) {
  const origin = 'http://127.0.0.1:3000'
  return {
    get: (path: string) => request(app).get(path).set('Cookie', cookie),
    post: (path: string, body: object = {}) => request(app).post(path).set('Cookie', cookie).set('Origin', origin).send(body),
  }
}

beforeAll(async () => {
  shop = await makeWorkshop(one.db, 'Journey Works')
  await one.db.transaction((tx) => seedCatalogue(tx, shop.workshop.id))
}, 60_000)

afterAll(async () => {
  for (const s of streams) s.close()
  for (const stop of stops) await stop()
  await one.close()
  await two.close()
})

describe('from finding to the customer’s decision, seen live by the advisor', () => {
  it('sends a real estimate, opens its e-mailed link, and a decision reaches advisors on both server processes', async () => {
    const [finding] = await one.db
      .insert(findings)
      .values({
        workshopId: shop.workshop.id,
        jobId: shop.job.id,
        position: 'front',
        title: 'Front prop shaft UJ worn',
        severity: 'soon',
        explanation: { what: 'The joint has play.', why: 'A worn joint knocks and can fail.', ifLeft: 'The prop shaft can come loose.' },
        suggestedRepair: { labour: ['PROP-UJ'], parts: ['UJ-STD'] },
      })
      .returning()
    if (!finding) throw new Error('no finding')

    // One sign-in: its session cookie serves the API calls and both live streams.
    const cookie = await signInCookie(one.app, shop.advisor.email)
    const advisor = withCookie(one.app, cookie)
    const created = (await advisor.post('/api/estimates', { jobId: shop.job.id, findingIds: [finding.id] })).body as EstimateDetail
    expect(
      created.draft.items[0]?.lines.map((l) => (l.kind === 'labour' ? l.operationCode : l.kind === 'part' ? l.partNumber : null)),
    ).toEqual(['PROP-UJ-F', 'UJ-STD-C'])

    const [a, b] = await Promise.all([listen(one.app), listen(two.app)])
    stops.push(a.close, b.close)
    const onOne = await openLiveStream(a.baseUrl, cookie)
    const onTwo = await openLiveStream(b.baseUrl, cookie)
    streams.push(onOne, onTwo)

    const since = Date.now()
    const sent = await advisor.post(`/api/estimates/${created.id}/send`, { revision: created.revision })
    expect(sent.status, JSON.stringify(sent.body)).toBe(200)
    await Promise.all([onOne, onTwo].map((s) => s.waitFor((e) => e.type === 'estimate.sent' && e.estimateId === created.id)))

    const mail = await waitForMail(shop.customer.email as string, { since, subject: /Estimate E-/ })
    const token = linkIn(mail).searchParams.get('token') ?? ''
    // The customer's browser talks to the second process.
    const customer = await openLink(two.app, token)
    await Promise.all([onOne, onTwo].map((s) => s.waitFor((e) => e.type === 'estimate.opened' && e.estimateId === created.id)))

    const page = (await customer.get(`/api/portal/estimates/${created.id}`)).body as PortalEstimate
    const item = page.snapshot.items[0]
    if (!item) throw new Error('no item')
    const decided = await customer.put(`/api/portal/estimates/${created.id}/decisions/${item.id}`, {
      version: page.version,
      decision: 'approved',
    })
    expect(decided.status, JSON.stringify(decided.body)).toBe(200)
    const expected = calculateEstimate(snapshotToEngineInput(page.snapshot, { [item.id]: 'approved' }))
    expect(decided.body.result.approved.gross).toBe(expected.approved.gross)

    const heard = await Promise.all(
      [onOne, onTwo].map((s) => s.waitFor((e) => e.type === 'estimate.decision' && e.estimateId === created.id)),
    )
    expect(heard.map((e) => e.workshopId)).toEqual([shop.workshop.id, shop.workshop.id])

    const detail = (await advisor.get(`/api/estimates/${created.id}`)).body as EstimateDetail
    expect(detail.status).toBe('opened')
    expect(detail.decisions).toEqual([expect.objectContaining({ itemId: item.id, decision: 'approved' })])
    expect(detail.decided?.approved.gross).toBe(expected.approved.gross)
  })
})
