import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { and, eq } from 'drizzle-orm'
import { customers, estimateLinks, findings, jobs } from '../../server/db/schema'
import { seedCatalogue } from '../../server/db/seed-catalogue'
import { calculateEstimate } from '../../shared/estimate'
import { draftToEngineInput, type EstimateDetail, type EstimateDraft } from '../../shared/schemas/estimates'
import { makeTestApp } from './helpers/app'
import { type Browser, type Fixture, makeWorkshop, signIn } from './helpers/fixtures'
import { linkIn, waitForMail } from './helpers/mail'

const t = makeTestApp()
afterAll(() => t.close())

const explanation = {
  what: 'Oil is leaking past the seal.',
  why: 'A seal that lets oil out lets water and grit in.',
  ifLeft: 'The joint wears quickly.',
}

async function addFinding(shop: Fixture, over: Partial<typeof findings.$inferInsert> = {}) {
  const [f] = await t.db
    .insert(findings)
    .values({
      workshopId: shop.workshop.id,
      jobId: shop.job.id,
      position: 'left',
      title: 'Swivel housing seal leaking',
      severity: 'soon',
      explanation,
      measurement: null,
      suggestedRepair: { labour: ['SWV-SEAL'], parts: ['SWV-SEAL-KIT'] },
      ...over,
    })
    .returning()
  if (!f) throw new Error('no finding')
  return f
}

describe('estimates', () => {
  let shop: Fixture
  let advisor: Browser

  beforeAll(async () => {
    shop = await makeWorkshop(t.db, 'Estimate Works')
    await t.db.transaction((tx) => seedCatalogue(tx, shop.workshop.id))
    advisor = await signIn(t.app, shop.advisor.email)
  })

  it('turns findings into items priced from the labour table and parts list, sharing access between them', async () => {
    const seal = await addFinding(shop)
    const cv = await addFinding(shop, {
      title: 'Left CV joint clicking on full lock',
      severity: 'urgent',
      suggestedRepair: { labour: ['CV-REPLACE'], parts: ['CV-JOINT', 'NOT-A-PART'] },
    })
    const res = await advisor.post('/api/estimates', { jobId: shop.job.id, findingIds: [seal.id, cv.id] })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const est = res.body as EstimateDetail
    expect(est.reference).toMatch(/^E-\d{4}$/)
    expect(est.status).toBe('draft')
    const [first, second] = est.draft.items
    expect(first?.title).toBe('Swivel housing seal leaking — left')
    expect(first?.lines.map((l) => l.kind)).toEqual(['labour', 'part'])
    const labour = first?.lines[0]
    expect(labour).toMatchObject({ kind: 'labour', operationCode: 'SWV-SEAL-L', accessSteps: ['HUB-FL'] })
    expect(first?.lines[1]).toMatchObject({ kind: 'part', partNumber: 'SWV-SEAL-KIT-C', quantity: '1' })
    // The hub step brings the steps it includes, so the engine can price the shared access.
    expect(est.draft.accessSteps.map((s) => s.code).sort()).toEqual(['CAL-FL', 'HUB-FL', 'WHL-FL'])
    expect(second?.severity).toBe('urgent')
    // Its own words already name the side, so nothing is added.
    expect(second?.title).toBe('Left CV joint clicking on full lock')
    expect(est.notices.join(' ')).toContain('NOT-A-PART')
    // The demo list has the seal kit for two vehicle groups; the advisor is told the first one is a guess.
    expect(est.notices.join(' ')).toContain('2 parts match SWV-SEAL-KIT (SWV-SEAL-KIT-C, SWV-SEAL-KIT-L)')

    // Both approved, the second item does not pay again for the hub the first one takes off.
    const figures = calculateEstimate(
      draftToEngineInput(est.draft, est.currency, { [first?.id ?? '']: 'approved', [second?.id ?? '']: 'approved' }),
    )
    expect(figures.items[1]?.sharedSaving).toBeGreaterThan(0)
    expect(figures.proposed.sharedSaving).toBe(figures.items[1]?.sharedSaving)

    const again = await advisor.post('/api/estimates', { jobId: shop.job.id })
    expect(again.status).toBe(409)
    expect(again.body.error.code).toBe('estimate_exists')
  })

  it('numbers 20 simultaneous creations 1 apart with no gaps or repeats', async () => {
    const own = await makeWorkshop(t.db, 'Numbering Works')
    const owner = await signIn(t.app, own.owner.email)
    const jobIds = await Promise.all(
      Array.from({ length: 20 }, async (_, i) => {
        const [j] = await t.db
          .insert(jobs)
          .values({ workshopId: own.workshop.id, vehicleId: own.vehicle.id, concern: `Concurrent job ${i}` })
          .returning()
        return j?.id as string
      }),
    )
    const answers = await Promise.all(jobIds.map((jobId) => owner.post('/api/estimates', { jobId })))
    expect(answers.map((a) => a.status)).toEqual(Array(20).fill(201))
    const numbers = answers.map((a) => (a.body as EstimateDetail).number).sort((a, b) => a - b)
    expect(numbers).toEqual(Array.from({ length: 20 }, (_, i) => i + 1))
  })

  it('refuses a stale save and a draft the engine cannot price, naming the field', async () => {
    const own = await makeWorkshop(t.db, 'Draft Works')
    const b = await signIn(t.app, own.advisor.email)
    const est = (await b.post('/api/estimates', { jobId: own.job.id })).body as EstimateDetail
    const draft: EstimateDraft = {
      ...est.draft,
      items: [
        {
          id: 'a',
          findingId: null,
          title: 'Prop shaft UJ worn',
          severity: 'soon',
          customerNote: '',
          requires: ['missing'],
          lines: [{ id: 'l1', kind: 'fee', description: 'Disposal', amount: 500, taxRate: '20' }],
        },
      ],
    }
    const bad = await b.put(`/api/estimates/${est.id}/draft`, { revision: est.revision, draft })
    expect(bad.status).toBe(422)
    expect(bad.body.error.issues.some((i: { path: unknown[] }) => i.path.join('.').startsWith('draft.items.0.requires'))).toBe(true)

    const ok = await b.put(`/api/estimates/${est.id}/draft`, {
      revision: est.revision,
      draft: { ...draft, items: [{ ...draft.items[0], requires: [] }] },
    })
    expect(ok.status, JSON.stringify(ok.body)).toBe(200)
    expect(ok.body.revision).toBe(est.revision + 1)
    const stale = await b.put(`/api/estimates/${est.id}/draft`, { revision: est.revision, draft })
    expect(stale.status).toBe(409)
    expect(stale.body.error.code).toBe('stale_revision')
  })

  it('sends a frozen version by e-mail, and a changed draft as a new version that supersedes it', async () => {
    const own = await makeWorkshop(t.db, 'Sending Works')
    await t.db.transaction((tx) => seedCatalogue(tx, own.workshop.id))
    const b = await signIn(t.app, own.advisor.email)
    const f = await addFinding(own)
    let est = (await b.post('/api/estimates', { jobId: own.job.id, findingIds: [f.id] })).body as EstimateDetail
    const since = Date.now()
    const sent = await b.post(`/api/estimates/${est.id}/send`, { revision: est.revision })
    expect(sent.status, JSON.stringify(sent.body)).toBe(200)
    est = sent.body as EstimateDetail
    expect(est.status).toBe('sent')
    expect(est.hasUnsentChanges).toBe(false)
    expect(est.versions).toHaveLength(1)
    const v1 = est.versions[0]
    expect(v1?.hash).toMatch(/^[0-9a-f]{64}$/)
    expect(v1?.proposedGross).toBe(calculateEstimate(draftToEngineInput(est.draft, est.currency)).proposed.gross)

    const mail = await waitForMail(own.customer.email as string, { since, subject: /Estimate E-\d{4}/ })
    const link = linkIn(mail)
    expect(link.pathname).toBe('/portal/open')
    expect(link.searchParams.get('token')).toMatch(/^[A-Za-z0-9_-]{43}$/)
    expect(mail.text).toContain(own.workshop.name)
    const [job] = await t.db.select().from(jobs).where(eq(jobs.id, own.job.id))
    expect(job?.status).toBe('waiting_for_customer')

    const again = await b.post(`/api/estimates/${est.id}/send`, { revision: est.revision })
    expect(again.status).toBe(409)
    expect(again.body.error.code).toBe('already_sent')

    // A price change: a new draft revision, then version 2 with another hash.
    const changed = structuredClone(est.draft)
    const part = changed.items[0]?.lines.find((l) => l.kind === 'part')
    if (part?.kind !== 'part') throw new Error('expected a part line')
    part.unitPrice += 1
    const saved = (await b.put(`/api/estimates/${est.id}/draft`, { revision: est.revision, draft: changed })).body as EstimateDetail
    expect(saved.hasUnsentChanges).toBe(true)
    const second = (await b.post(`/api/estimates/${est.id}/send`, { revision: saved.revision })).body as EstimateDetail
    expect(second.versions.map((v) => v.version)).toEqual([1, 2])
    expect(second.versions[0]?.supersededAt).not.toBeNull()
    expect(second.versions[1]?.hash).not.toBe(v1?.hash)
    const links = await t.db.select().from(estimateLinks).where(eq(estimateLinks.workshopId, own.workshop.id))
    expect(links.filter((l) => l.revokedAt === null).map((l) => l.versionId)).toEqual([second.versions[1]?.id])

    const pdf = await b.get(`/api/estimates/${est.id}/versions/2/pdf`)
    expect(pdf.status).toBe(200)
    expect(pdf.headers['content-type']).toBe('application/pdf')
    expect(pdf.headers['content-disposition']).toMatch(/E-\d{4}-v2\.pdf/)
    expect(
      Buffer.from(pdf.body as Buffer)
        .subarray(0, 5)
        .toString(),
    ).toBe('%PDF-')

    const listed = await b.get(`/api/estimates?status=sent&q=${encodeURIComponent(own.vehicle.registration)}`)
    expect(listed.body.items.map((i: { id: string }) => i.id)).toEqual([est.id])
    const byNumber = await b.get(`/api/estimates?q=${est.reference}`)
    expect(byNumber.body.items.map((i: { id: string }) => i.id)).toEqual([est.id])
    const drafts = await b.get('/api/estimates?status=draft')
    expect(drafts.body.items.map((i: { id: string }) => i.id)).not.toContain(est.id)

    const withdrawn = await b.post(`/api/estimates/${est.id}/withdraw`)
    expect(withdrawn.body.status).toBe('withdrawn')
    const live = await t.db
      .select()
      .from(estimateLinks)
      .where(and(eq(estimateLinks.workshopId, own.workshop.id)))
    expect(live.every((l) => l.revokedAt !== null)).toBe(true)
  })

  it('will not send an empty estimate or to a customer without an e-mail address, and says why', async () => {
    const own = await makeWorkshop(t.db, 'No Mail Works')
    await t.db.update(customers).set({ email: null, phone: '01632 960000' }).where(eq(customers.id, own.customer.id))
    const b = await signIn(t.app, own.advisor.email)
    const est = (await b.post('/api/estimates', { jobId: own.job.id })).body as EstimateDetail
    const res = await b.post(`/api/estimates/${est.id}/send`, { revision: est.revision })
    expect(res.status).toBe(422)
    const words = res.body.error.issues.map((i: { message: string }) => i.message).join(' ')
    expect(words).toContain('Add at least one item')
    expect(words).toContain('has no e-mail address')
  })

  it('keeps one workshop out of another’s estimates', async () => {
    const other = await makeWorkshop(t.db, 'Other Works')
    const stranger = await signIn(t.app, other.advisor.email)
    const mine = (await advisor.get(`/api/estimates?jobId=${shop.job.id}`)).body.items[0] as { id: string }
    expect((await stranger.get(`/api/estimates/${mine.id}`)).status).toBe(404)
    expect((await stranger.get(`/api/estimates/${mine.id}/versions/1/pdf`)).status).toBe(404)
  })
})
