import { sql } from 'drizzle-orm'
import { afterAll, describe, expect, it } from 'vitest'
import { auditEvents } from '../../server/db/schema'
import { makeTestApp } from './helpers/app'
import { browser, makeWorkshop, signIn } from './helpers/fixtures'
import { linkIn, waitForMail } from './helpers/mail'

const t = makeTestApp()
afterAll(() => t.close())

async function errorOf(promise: Promise<unknown>): Promise<string> {
  try {
    await promise
  } catch (err) {
    const e = err as { message: string; cause?: { message?: string } }
    return e.cause?.message ?? e.message
  }
  return 'no error'
}

describe('audit log', () => {
  it('refuses UPDATE, DELETE and TRUNCATE at the database', async () => {
    const f = await makeWorkshop(t.db)
    await t.db.insert(auditEvents).values({ workshopId: f.workshop.id, actorKind: 'system', action: 'settings.changed' })
    expect(await errorOf(t.db.execute(sql`update audit_events set action = 'x' where workshop_id = ${f.workshop.id}`))).toMatch(
      /append-only: UPDATE/,
    )
    expect(await errorOf(t.db.execute(sql`delete from audit_events where workshop_id = ${f.workshop.id}`))).toMatch(/append-only: DELETE/)
    expect(await errorOf(t.db.execute(sql`truncate audit_events`))).toMatch(/append-only: TRUNCATE/)
  })

  it('records sign-in with IP and user agent, and an owner can filter the log', async () => {
    const f = await makeWorkshop(t.db)
    const owner = await signIn(t.app, f.owner.email)
    await signIn(t.app, f.advisor.email)
    const all = await owner.get('/api/audit-events').expect(200)
    const actions = (all.body.items as { action: string }[]).map((e) => e.action)
    expect(actions).toEqual(expect.arrayContaining(['sign_in.requested', 'sign_in.succeeded']))
    const filtered = await owner.get(`/api/audit-events?action=sign_in.succeeded&actorId=${f.advisor.id}`).expect(200)
    expect(filtered.body.total).toBe(1)
    expect(filtered.body.items[0]).toMatchObject({
      action: 'sign_in.succeeded',
      actorId: f.advisor.id,
      actorName: 'Adam Advisor',
      ip: expect.stringMatching(/127\.0\.0\.1/),
    })
  })

  it('shows a workshop only its own events', async () => {
    const a = await makeWorkshop(t.db)
    const b = await makeWorkshop(t.db)
    await signIn(t.app, a.advisor.email)
    const ownerB = await signIn(t.app, b.owner.email)
    const res = await ownerB.get(`/api/audit-events?actorId=${a.advisor.id}`).expect(200)
    expect(res.body.total).toBe(0)
  })

  it('filters by whole days in the workshop’s time zone', async () => {
    const f = await makeWorkshop(t.db)
    const owner = await signIn(t.app, f.owner.email)
    // 23:30 UTC on 1 July is 00:30 on 2 July in London (British Summer Time, UTC+1).
    await t.db.insert(auditEvents).values([
      { workshopId: f.workshop.id, actorKind: 'system', action: 'settings.changed', createdAt: new Date('2026-07-01T23:30:00Z') },
      { workshopId: f.workshop.id, actorKind: 'system', action: 'settings.changed', createdAt: new Date('2026-07-01T22:30:00Z') },
    ])
    const day = await owner.get('/api/audit-events?action=settings.changed&from=2026-07-02&to=2026-07-02').expect(200)
    expect(day.body.items.map((e: { createdAt: string }) => e.createdAt)).toEqual(['2026-07-01T23:30:00.000Z'])
  })

  it('records a reused link as a failed sign-in with its reason', async () => {
    const f = await makeWorkshop(t.db)
    const owner = await signIn(t.app, f.owner.email)
    const since = Date.now()
    await browser(t.app).post('/api/auth/staff/link', { email: f.advisor.email }).expect(202)
    const token = linkIn(await waitForMail(f.advisor.email, { since })).searchParams.get('token')
    await browser(t.app).post('/api/auth/verify', { token }).expect(200)
    await browser(t.app).post('/api/auth/verify', { token }).expect(400)
    const res = await owner.get('/api/audit-events?action=sign_in.failed').expect(200)
    expect(res.body.items).toEqual([expect.objectContaining({ actorKind: 'anonymous', details: { reason: 'already_used' } })])
  })
})
