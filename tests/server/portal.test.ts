import fs from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import { and, eq, sql } from 'drizzle-orm'
import pino from 'pino'
import request from 'supertest'
import { afterAll, describe, expect, it } from 'vitest'
import { createApp } from '../../server/app'
import {
  auditEvents,
  estimateConfirmations,
  estimateDecisions,
  estimateLinks,
  estimateQuestions,
  estimates,
  jobs,
  outboundEmails,
} from '../../server/db/schema'
import { createLocalStorage } from '../../server/lib/storage'
import { revokeEstimateLinks } from '../../server/modules/portal/estimate-links.repo'
import { calculateEstimate } from '../../shared/estimate'
import type { Decision } from '../../shared/estimate/contract'
import { snapshotToEngineInput } from '../../shared/schemas/estimates'
import { DecisionResponseSchema, OpenLinkResponseSchema, PortalEstimateSchema } from '../../shared/schemas/portal'
import { makeTestApp } from './helpers/app'
import { browser, makeWorkshop, signIn } from './helpers/fixtures'
import { WORKSHOP_EMAIL, addCustomer, addPhoto, openLink, portalDraft, sendNextVersion, sendWithLink, versionRow } from './helpers/portal'

const t = makeTestApp()
const storage = createLocalStorage(t.env.UPLOAD_DIR)
afterAll(() => t.close())

const yesterday = () => new Date(Date.now() - 86_400_000).toISOString().slice(0, 10)
const engine = (snapshot: Parameters<typeof snapshotToEngineInput>[0], decisions: Record<string, Decision>) =>
  calculateEstimate(snapshotToEngineInput(snapshot, decisions))

/** The session cookie a response sets: a new value means a new session id. */
function sessionCookie(res: { headers: Record<string, unknown> }): string | undefined {
  const cookies = (res.headers['set-cookie'] ?? []) as string[]
  return cookies.find((c) => c.startsWith('tickover.sid=') || c.startsWith('__Host-tickover='))?.split(';')[0]
}

async function emailsOf(estimateId: string) {
  return t.db.select().from(outboundEmails).where(eq(outboundEmails.estimateId, estimateId))
}

describe('opening the estimate link', () => {
  it('signs the customer in to that estimate, records the first opening once, and sends no referrer', async () => {
    const fx = await makeWorkshop(t.db, 'Portal Open')
    const sent = await sendWithLink(t.db, fx)
    const b = browser(t.app)
    const res = await b.post('/api/portal/open', { token: sent.token }).expect(200)
    expect(res.headers['referrer-policy']).toBe('no-referrer')
    expect(res.headers['cache-control']).toBe('no-store')
    const body = OpenLinkResponseSchema.parse(res.body)
    expect(body).toMatchObject({ estimateId: sent.estimate.id, version: 1, user: { kind: 'customer', id: fx.customer.id } })

    expect((await b.get('/api/auth/me').expect(200)).body.user).toMatchObject({ kind: 'customer', id: fx.customer.id })
    const page = PortalEstimateSchema.parse((await b.get(`/api/portal/estimates/${sent.estimate.id}`).expect(200)).body)
    expect(page).toMatchObject({
      version: 1,
      latestVersion: 1,
      superseded: false,
      expired: false,
      withdrawn: false,
      canDecide: true,
      status: 'opened',
      hash: sent.version.hash,
    })
    expect(page.snapshot.items.map((i) => i.id)).toEqual(['seals', 'uj', 'bearing'])
    expect(Object.values(page.decisions)).toEqual(['pending', 'pending', 'pending'])
    expect(page.result.proposed.gross).toBe(engine(sent.snapshot, {}).proposed.gross)
    expect(page.cancellation.trader.name).toBe(fx.workshop.name)
    expect(page.cancellation.notice).toMatch(/not legal advice/)
    const list = (await b.get('/api/portal/estimates').expect(200)).body.items
    expect(list).toEqual([expect.objectContaining({ id: sent.estimate.id, latestVersion: 1, status: 'opened', reference: sent.reference })])

    const first = (await versionRow(t.db, sent.version.id)).openedAt
    expect(first).toBeInstanceOf(Date)
    await browser(t.app).post('/api/portal/open', { token: sent.token }).expect(200)
    expect((await versionRow(t.db, sent.version.id)).openedAt?.getTime()).toBe(first?.getTime())

    const opened = await t.db
      .select({ details: auditEvents.details, actorId: auditEvents.actorId })
      .from(auditEvents)
      .where(and(eq(auditEvents.workshopId, fx.workshop.id), eq(auditEvents.action, 'estimate.opened')))
    expect(opened.map((e) => e.details.firstOpening).sort()).toEqual([false, true])
    expect(opened.every((e) => e.actorId === fx.customer.id)).toBe(true)
    const [link] = await t.db.select().from(estimateLinks).where(eq(estimateLinks.versionId, sent.version.id))
    expect(link?.lastUsedAt).toBeInstanceOf(Date)
  })

  it('switches a browser signed in as someone else to the link’s customer, with a new session', async () => {
    const fx = await makeWorkshop(t.db, 'Portal Switch')
    const other = await addCustomer(t.db, fx, 'Owen Other')
    const mine = await sendWithLink(t.db, fx)
    const theirs = await sendWithLink(t.db, other)
    const b = browser(t.app)
    const before = sessionCookie(await b.post('/api/portal/open', { token: theirs.token }).expect(200))
    const after = sessionCookie(await b.post('/api/portal/open', { token: mine.token }).expect(200))
    expect(before).toBeTruthy()
    expect(after).toBeTruthy()
    expect(after).not.toBe(before)
    expect((await b.get('/api/auth/me').expect(200)).body.user.id).toBe(fx.customer.id)
    await b.get(`/api/portal/estimates/${theirs.estimate.id}`).expect(404)

    const staff = await signIn(t.app, fx.advisor.email)
    await openLink(t.app, mine.token, staff)
    expect((await staff.get('/api/auth/me').expect(200)).body.user).toMatchObject({ kind: 'customer', id: fx.customer.id })
  })

  it('refuses an expired link with 410 link_expired', async () => {
    const fx = await makeWorkshop(t.db, 'Portal Expired')
    const sent = await sendWithLink(t.db, fx, {
      draft: portalDraft({ expiresOn: yesterday() }),
      linkExpiresAt: new Date(Date.now() - 60_000),
    })
    const res = await browser(t.app).post('/api/portal/open', { token: sent.token }).expect(410)
    expect(res.body.error).toMatchObject({ code: 'link_expired', details: { newerVersion: false, renewable: false } })
    expect(res.headers['referrer-policy']).toBe('no-referrer')
    expect((await versionRow(t.db, sent.version.id)).openedAt).toBeNull()
  })

  it('refuses a revoked link with 410 link_revoked, and a replaced one with link_superseded and a newer version to renew', async () => {
    const fx = await makeWorkshop(t.db, 'Portal Revoked')
    const sent = await sendWithLink(t.db, fx)
    await revokeEstimateLinks(t.db, fx.workshop.id, sent.estimate.id)
    const revoked = await browser(t.app).post('/api/portal/open', { token: sent.token }).expect(410)
    expect(revoked.body.error).toMatchObject({ code: 'link_revoked', details: { newerVersion: false, renewable: true } })

    const again = await sendWithLink(t.db, fx)
    const next = await sendNextVersion(t.db, again)
    const superseded = await browser(t.app).post('/api/portal/open', { token: again.token }).expect(410)
    expect(superseded.body.error).toMatchObject({ code: 'link_superseded', details: { newerVersion: true, renewable: true } })
    await openLink(t.app, next.token)

    await t.db
      .update(estimates)
      .set({ withdrawnAt: sql`now()` })
      .where(eq(estimates.id, next.estimate.id))
    const withdrawn = await browser(t.app).post('/api/portal/open', { token: next.token }).expect(410)
    expect(withdrawn.body.error).toMatchObject({ code: 'link_revoked', details: { renewable: false } })
  })

  it('answers 400 link_invalid for a token it never issued, without the token in the answer', async () => {
    const token = 'not-a-token-we-issued-0123456789abcdef'
    const res = await browser(t.app).post('/api/portal/open', { token }).expect(400)
    expect(res.body.error.code).toBe('link_invalid')
    expect(JSON.stringify(res.body)).not.toContain(token)
  })
})

describe('asking for a fresh link', () => {
  it('answers the same for a known and an unknown token, and e-mails a link to the latest version only for the known one', async () => {
    const fx = await makeWorkshop(t.db, 'Portal Renew')
    const sent = await sendWithLink(t.db, fx)
    const next = await sendNextVersion(t.db, sent)
    const known = await browser(t.app).post('/api/portal/estimate-links/renew', { token: sent.token })
    const unknown = await browser(t.app).post('/api/portal/estimate-links/renew', { token: 'x'.repeat(43) })
    expect(known.status).toBe(202)
    expect(unknown.status).toBe(known.status)
    expect(unknown.body).toEqual(known.body)
    expect(known.headers['referrer-policy']).toBe('no-referrer')

    const mails = (await emailsOf(sent.estimate.id)).filter((m) => m.kind === 'estimate.link_renewed')
    expect(mails).toHaveLength(1)
    expect(mails[0]?.to).toBe(fx.customer.email)
    const text = String(mails[0]?.message.text)
    const url = /https?:\/\/\S+\/portal\/open\?token=([^\s]+)/.exec(text)
    expect(url?.[1]).toBeTruthy()
    const opened = await browser(t.app)
      .post('/api/portal/open', { token: decodeURIComponent(url?.[1] ?? '') })
      .expect(200)
    expect(opened.body).toMatchObject({ estimateId: next.estimate.id, version: 2 })
  })

  it('is rate-limited per token when limits are on', async () => {
    const limited = makeTestApp({ RATE_LIMITS: 'true' })
    try {
      const token = `limited-${Math.random().toString(36).slice(2)}-0123456789abcdef`
      const statuses: number[] = []
      for (let i = 0; i < 4; i++) statuses.push((await browser(limited.app).post('/api/portal/estimate-links/renew', { token })).status)
      expect(statuses).toEqual([202, 202, 202, 429])
    } finally {
      await limited.close()
    }
  })
})

describe('reading is limited to the customer’s own estimates', () => {
  it('serves the photos and PDF of one’s own estimate and 404 to another customer of the same or another workshop', async () => {
    const fx = await makeWorkshop(t.db, 'Portal Own')
    const photo = await addPhoto(t.db, storage, fx)
    const stray = await addPhoto(t.db, storage, fx)
    const sent = await sendWithLink(t.db, fx, { photoIds: { seals: [photo.id] } })
    const owner = await openLink(t.app, sent.token)
    const base = `/api/portal/estimates/${sent.estimate.id}`

    const full = await owner.get(`${base}/photos/${photo.id}`).expect(200)
    expect(full.headers['content-type']).toBe('image/jpeg')
    expect(Buffer.compare(full.body as Buffer, photo.data)).toBe(0)
    await owner.get(`${base}/photos/${photo.id}/thumb`).expect(200)
    // A photo of the same workshop that is not on this estimate's snapshot is not served.
    await owner.get(`${base}/photos/${stray.id}`).expect(404)
    const pdf = await owner.get(`${base}/pdf`).buffer(true).expect(200)
    expect(pdf.headers['content-type']).toBe('application/pdf')
    expect(pdf.headers['content-disposition']).toContain(`${sent.reference}-v1.pdf`)
    expect((pdf.body as Buffer).subarray(0, 5).toString()).toBe('%PDF-')

    const neighbour = await addCustomer(t.db, fx, 'Nia Neighbour')
    const away = await makeWorkshop(t.db, 'Portal Away')
    for (const intruder of [
      await openLink(t.app, (await sendWithLink(t.db, neighbour)).token),
      await openLink(t.app, (await sendWithLink(t.db, away)).token),
    ]) {
      await intruder.get(base).expect(404)
      await intruder.get(`${base}/photos/${photo.id}`).expect(404)
      await intruder.get(`${base}/photos/${photo.id}/thumb`).expect(404)
      await intruder.get(`${base}/pdf`).expect(404)
      await intruder.get(`${base}/deposit`).expect(404)
      await intruder.put(`${base}/decisions/uj`, { version: 1, decision: 'approved' }).expect(404)
      await intruder.post(`${base}/questions`, { itemId: 'uj', question: 'Mine?' }).expect(404)
      await intruder
        .post(`${base}/confirm`, {
          version: 1,
          hash: sent.version.hash,
          consents: { startWithinCancellationPeriod: false, cancellationInformationShown: true },
        })
        .expect(404)
      expect((await intruder.get('/api/portal/estimates').expect(200)).body.items.map((i: { id: string }) => i.id)).not.toContain(
        sent.estimate.id,
      )
    }
    expect(await t.db.select().from(estimateDecisions).where(eq(estimateDecisions.versionId, sent.version.id))).toEqual([])
  })
})

describe('deciding', () => {
  it('ends ten concurrent decisions on two items in one consistent state whose confirmed totals are the engine’s', async () => {
    const fx = await makeWorkshop(t.db, 'Portal Race')
    const sent = await sendWithLink(t.db, fx)
    const b = await openLink(t.app, sent.token)
    const base = `/api/portal/estimates/${sent.estimate.id}`
    const responses = await Promise.all(
      Array.from({ length: 10 }, (_, i) =>
        b.put(`${base}/decisions/${i % 2 === 0 ? 'seals' : 'uj'}`, { version: 1, decision: i % 4 < 2 ? 'approved' : 'declined' }),
      ),
    )
    expect(responses.map((r) => r.status)).toEqual(Array(10).fill(200))
    // Each answer is the engine's figures for the decisions it reports.
    for (const r of responses) {
      const body = DecisionResponseSchema.parse(r.body)
      expect(body.result.approved).toEqual(engine(sent.snapshot, body.decisions).approved)
    }

    const page = PortalEstimateSchema.parse((await b.get(base).expect(200)).body)
    const stored = await t.db.select().from(estimateDecisions).where(eq(estimateDecisions.versionId, sent.version.id))
    expect(stored).toHaveLength(2)
    for (const row of stored) expect(page.decisions[row.itemId]).toBe(row.decision)
    // The final state is one of the answers given: the last transaction to commit.
    expect(responses.some((r) => JSON.stringify(r.body.decisions) === JSON.stringify(page.decisions))).toBe(true)
    expect(page.result).toEqual(engine(sent.snapshot, page.decisions))

    await b.put(`${base}/decisions/bearing`, { version: 1, decision: 'declined' }).expect(200)
    const final = { ...page.decisions, bearing: 'declined' as const }
    const confirmed = await b
      .post(`${base}/confirm`, {
        version: 1,
        hash: sent.version.hash,
        consents: { startWithinCancellationPeriod: false, cancellationInformationShown: true },
      })
      .expect(201)
    const [row] = await t.db.select().from(estimateConfirmations).where(eq(estimateConfirmations.versionId, sent.version.id))
    const expected = engine(sent.snapshot, final)
    expect(row?.decisions).toEqual(final)
    expect(row?.approvedGross).toBe(expected.approved.gross)
    expect(row?.depositMinor).toBe(expected.approved.deposit)
    expect(confirmed.body.depositDue).toBe(expected.approved.deposit)
  })

  it('refuses a decision on a replaced version with 409 and the latest version number', async () => {
    const fx = await makeWorkshop(t.db, 'Portal Superseded')
    const sent = await sendWithLink(t.db, fx)
    const b = await openLink(t.app, sent.token)
    await sendNextVersion(t.db, sent)
    const res = await b.put(`/api/portal/estimates/${sent.estimate.id}/decisions/uj`, { version: 1, decision: 'approved' }).expect(409)
    expect(res.body.error).toMatchObject({ code: 'superseded', details: { latestVersion: 2 } })
    const page = PortalEstimateSchema.parse((await b.get(`/api/portal/estimates/${sent.estimate.id}?version=1`).expect(200)).body)
    expect(page).toMatchObject({ version: 1, latestVersion: 2, superseded: true, canDecide: false })
    await b.put(`/api/portal/estimates/${sent.estimate.id}/decisions/uj`, { version: 2, decision: 'approved' }).expect(200)
  })

  it('refuses to approve an item whose required item is not approved, naming it, and changes nothing', async () => {
    const fx = await makeWorkshop(t.db, 'Portal Requires')
    const sent = await sendWithLink(t.db, fx)
    const b = await openLink(t.app, sent.token)
    const base = `/api/portal/estimates/${sent.estimate.id}`
    const refused = await b.put(`${base}/decisions/bearing`, { version: 1, decision: 'approved' }).expect(422)
    expect(refused.body.error.code).toBe('requires')
    expect(refused.body.error.message).toContain('item 1 (Swivel housing seal — left)')
    await b.put(`${base}/decisions/seals`, { version: 1, decision: 'approved' }).expect(200)
    await b.put(`${base}/decisions/bearing`, { version: 1, decision: 'approved' }).expect(200)
    const undo = await b.put(`${base}/decisions/seals`, { version: 1, decision: 'declined' }).expect(422)
    expect(undo.body.error.message).toContain('item 3 (Swivel bearing preload)')
    const page = PortalEstimateSchema.parse((await b.get(base).expect(200)).body)
    expect(page.decisions).toEqual({ seals: 'approved', uj: 'pending', bearing: 'approved' })
  })

  it('refuses decisions once the decision date has passed (410) and on an unknown item (404)', async () => {
    const fx = await makeWorkshop(t.db, 'Portal Late')
    const sent = await sendWithLink(t.db, fx)
    const b = await openLink(t.app, sent.token)
    await b.put(`/api/portal/estimates/${sent.estimate.id}/decisions/nope`, { version: 1, decision: 'approved' }).expect(404)
    await t.db.execute(sql`update estimate_versions set expires_on = current_date - 2 where id = ${sent.version.id}`)
    const res = await b.put(`/api/portal/estimates/${sent.estimate.id}/decisions/uj`, { version: 1, decision: 'approved' }).expect(410)
    expect(res.body.error.code).toBe('expired')
  })
})

describe('confirming', () => {
  const consents = { startWithinCancellationPeriod: true, cancellationInformationShown: true } as const

  it('refuses while items are undecided, listing them in words', async () => {
    const fx = await makeWorkshop(t.db, 'Portal Undecided')
    const sent = await sendWithLink(t.db, fx)
    const b = await openLink(t.app, sent.token)
    const base = `/api/portal/estimates/${sent.estimate.id}`
    await b.put(`${base}/decisions/uj`, { version: 1, decision: 'approved' }).expect(200)
    const res = await b.post(`${base}/confirm`, { version: 1, hash: sent.version.hash, consents }).expect(422)
    expect(res.body.error.code).toBe('undecided')
    expect(res.body.error.message).toContain('item 1 (Swivel housing seal — left)')
    expect(res.body.error.message).toContain('item 3 (Swivel bearing preload)')
    expect(res.body.error.issues.map((i: { path: string[] }) => i.path.at(-1))).toEqual(['seals', 'bearing'])
  })

  it('stores what was agreed with IP, user agent, consents and hash; a second confirm answers with the same record', async () => {
    const fx = await makeWorkshop(t.db, 'Portal Confirm')
    const sent = await sendWithLink(t.db, fx)
    const b = await openLink(t.app, sent.token)
    const base = `/api/portal/estimates/${sent.estimate.id}`
    const decisions = { seals: 'approved', uj: 'declined', bearing: 'approved' } as const
    for (const [item, decision] of Object.entries(decisions)) await b.put(`${base}/decisions/${item}`, { version: 1, decision }).expect(200)
    expect((await b.get(`${base}/deposit`).expect(200)).body).toMatchObject({ status: 'not_due', amountMinor: 0 })

    await b.post(`${base}/confirm`, { version: 1, hash: 'f'.repeat(64), consents }).expect(422)
    const first = await b.agent
      .post(`${base}/confirm`)
      .set('Origin', 'http://127.0.0.1:3000')
      .set('User-Agent', 'PortalTest/1.0 (phone)')
      .send({ version: 1, hash: sent.version.hash, consents })
      .expect(201)
    const expected = engine(sent.snapshot, decisions)
    expect(expected.approved.deposit).toBeGreaterThan(0)
    expect(first.body).toEqual({ confirmationId: expect.any(String), depositDue: expected.approved.deposit, next: 'pay' })

    const [row] = await t.db.select().from(estimateConfirmations).where(eq(estimateConfirmations.versionId, sent.version.id))
    expect(row).toMatchObject({
      id: first.body.confirmationId,
      customerId: fx.customer.id,
      versionHash: sent.version.hash,
      decisions,
      consents,
      approvedGross: expected.approved.gross,
      depositMinor: expected.approved.deposit,
      userAgent: 'PortalTest/1.0 (phone)',
    })
    expect(row?.ip).toMatch(/127\.0\.0\.1|::1/)
    expect(row?.result).toEqual(expected)
    expect((await versionRow(t.db, sent.version.id)).confirmedAt).toBeInstanceOf(Date)

    const second = await b.post(`${base}/confirm`, { version: 1, hash: sent.version.hash, consents }).expect(200)
    expect(second.body).toEqual(first.body)
    expect(await t.db.select().from(estimateConfirmations).where(eq(estimateConfirmations.versionId, sent.version.id))).toHaveLength(1)
    const late = await b.put(`${base}/decisions/uj`, { version: 1, decision: 'approved' }).expect(409)
    expect(late.body.error.code).toBe('confirmed')

    expect((await b.get(`${base}/deposit`).expect(200)).body).toMatchObject({
      status: 'awaiting_payment',
      amountMinor: expected.approved.deposit,
    })
    const page = PortalEstimateSchema.parse((await b.get(base).expect(200)).body)
    expect(page).toMatchObject({ status: 'confirmed', canDecide: false, confirmation: { id: first.body.confirmationId } })
    // A deposit is due, so the job waits for it.
    const [job] = await t.db.select({ status: jobs.status }).from(jobs).where(eq(jobs.id, fx.job.id))
    expect(job?.status).not.toBe('in_work')

    const mails = await emailsOf(sent.estimate.id)
    const toCustomer = mails.find((m) => m.kind === 'estimate.confirmed')
    expect(toCustomer?.to).toBe(fx.customer.email)
    expect(toCustomer?.message.attachments).toEqual([
      { type: 'estimate-pdf', versionId: sent.version.id, filename: `${sent.reference}-v1.pdf` },
    ])
    expect(mails.find((m) => m.kind === 'estimate.confirmed.copy')?.to).toBe(WORKSHOP_EMAIL)
    const audit = await t.db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.subjectId, sent.estimate.id), eq(auditEvents.action, 'estimate.confirmed')))
    expect(audit).toHaveLength(1)
  })

  it('records a refusal of every item with nothing due, and starts work at once when approved work needs no deposit', async () => {
    const fx = await makeWorkshop(t.db, 'Portal Decline')
    const sent = await sendWithLink(t.db, fx)
    const b = await openLink(t.app, sent.token)
    const base = `/api/portal/estimates/${sent.estimate.id}`
    for (const item of ['uj', 'bearing', 'seals'])
      await b.put(`${base}/decisions/${item}`, { version: 1, decision: 'declined' }).expect(200)
    const res = await b.post(`${base}/confirm`, { version: 1, hash: sent.version.hash, consents }).expect(201)
    expect(res.body).toMatchObject({ depositDue: 0, next: 'done' })
    const [row] = await t.db.select().from(estimateConfirmations).where(eq(estimateConfirmations.versionId, sent.version.id))
    expect(row?.approvedGross).toBe(0)
    await b.post(`${base}/deposit/checkout`).expect(409)

    const other = await addCustomer(t.db, fx, 'Nell Nodeposit')
    const free = await sendWithLink(t.db, other, { draft: portalDraft({ deposit: { kind: 'none' } }) })
    const c = await openLink(t.app, free.token)
    const freeBase = `/api/portal/estimates/${free.estimate.id}`
    for (const [item, decision] of [
      ['uj', 'approved'],
      ['seals', 'declined'],
      ['bearing', 'declined'],
    ])
      await c.put(`${freeBase}/decisions/${item}`, { version: 1, decision }).expect(200)
    expect((await c.post(`${freeBase}/confirm`, { version: 1, hash: free.version.hash, consents }).expect(201)).body).toMatchObject({
      depositDue: 0,
      next: 'done',
    })
    const [job] = await t.db.select({ status: jobs.status }).from(jobs).where(eq(jobs.id, other.job.id))
    expect(job?.status).toBe('in_work')
  })

  it('sends the customer to the payment page for the deposit the engine worked out', async () => {
    const fx = await makeWorkshop(t.db, 'Portal Pay')
    const sent = await sendWithLink(t.db, fx)
    const b = await openLink(t.app, sent.token)
    const base = `/api/portal/estimates/${sent.estimate.id}`
    await b.post(`${base}/deposit/checkout`).expect(409)
    for (const item of ['seals', 'uj', 'bearing'])
      await b.put(`${base}/decisions/${item}`, { version: 1, decision: 'approved' }).expect(200)
    await b.post(`${base}/confirm`, { version: 1, hash: sent.version.hash, consents }).expect(201)
    const res = await b.post(`${base}/deposit/checkout`).expect(200)
    expect(res.body.url).toMatch(/^https?:\/\//)
    const deposit = (await b.get(`${base}/deposit`).expect(200)).body
    expect(deposit).toMatchObject({
      status: 'awaiting_payment',
      amountMinor: engine(sent.snapshot, { seals: 'approved', uj: 'approved', bearing: 'approved' }).approved.deposit,
    })
  })
})

describe('questions', () => {
  it('e-mails the workshop a customer’s question and the customer the answer with a link back', async () => {
    const fx = await makeWorkshop(t.db, 'Portal Questions')
    const sent = await sendWithLink(t.db, fx)
    const b = await openLink(t.app, sent.token)
    const asked = await b
      .post(`/api/portal/estimates/${sent.estimate.id}/questions`, { itemId: 'uj', question: 'Can this wait until next month?' })
      .expect(201)
    expect(asked.body).toMatchObject({ itemId: 'uj', version: 1, answer: null })
    await b.post(`/api/portal/estimates/${sent.estimate.id}/questions`, { itemId: 'nope', question: 'Which?' }).expect(404)
    expect((await emailsOf(sent.estimate.id)).find((m) => m.kind === 'estimate.question')?.to).toBe(WORKSHOP_EMAIL)

    const advisor = await signIn(t.app, fx.advisor.email)
    const list = (await advisor.get(`/api/estimates/${sent.estimate.id}/questions`).expect(200)).body.items
    expect(list).toEqual([
      expect.objectContaining({ id: asked.body.id, itemNumber: 2, itemTitle: 'Front prop shaft UJ', customerName: fx.customer.name }),
    ])
    const answered = await advisor
      .post(`/api/estimates/${sent.estimate.id}/questions/${asked.body.id}/answer`, {
        answer: 'Not safely: the joint is close to failing.',
      })
      .expect(200)
    expect(answered.body).toMatchObject({ answer: 'Not safely: the joint is close to failing.', answeredBy: { id: fx.advisor.id } })

    const reply = (await emailsOf(sent.estimate.id)).find((m) => m.kind === 'estimate.question_answered')
    expect(reply?.to).toBe(fx.customer.email)
    const token = /\/portal\/open\?token=(\S+)/.exec(String(reply?.message.text))?.[1]
    await openLink(t.app, decodeURIComponent(token ?? ''))
    const page = PortalEstimateSchema.parse((await b.get(`/api/portal/estimates/${sent.estimate.id}`).expect(200)).body)
    expect(page.questions).toEqual([expect.objectContaining({ id: asked.body.id, answer: 'Not safely: the joint is close to failing.' })])

    const stranger = await signIn(t.app, (await makeWorkshop(t.db, 'Portal Strangers')).owner.email)
    await stranger.get(`/api/estimates/${sent.estimate.id}/questions`).expect(404)
    await stranger.post(`/api/estimates/${sent.estimate.id}/questions/${asked.body.id}/answer`, { answer: 'Mine now' }).expect(404)
    const [kept] = await t.db.select().from(estimateQuestions).where(eq(estimateQuestions.id, asked.body.id))
    expect(kept?.answer).toBe('Not safely: the joint is close to failing.')
  })
})

describe('the app shell for the link page', () => {
  it('sends no referrer with the page that carries the token', async () => {
    const dist = fs.mkdtempSync(path.join(os.tmpdir(), 'tickover-shell-'))
    fs.writeFileSync(path.join(dist, 'index.html'), '<!doctype html><title>Tickover</title>')
    const app = createApp({
      env: { ...t.env, CLIENT_DIST: dist },
      db: t.db,
      pool: t.pool,
      logger: pino({ level: 'silent' }),
      version: 'test',
      liveHub: t.liveHub,
      outbox: t.outbox,
    })
    const res = await request(app).get('/portal/open?token=abc').expect(200)
    expect(res.headers['content-type']).toMatch(/text\/html/)
    expect(res.headers['referrer-policy']).toBe('no-referrer')
    fs.rmSync(dist, { recursive: true, force: true })
  })
})
