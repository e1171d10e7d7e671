import { eq, sql } from 'drizzle-orm'
import type { Express } from 'express'
import sharp from 'sharp'
import type { Database, Tx } from '../../../server/db/client'
import { customers, estimateVersions, findings, jobs, photos, vehicles } from '../../../server/db/schema'
import type { FileStorage } from '../../../server/lib/storage'
import type { EmailOutbox, OutboundMessage } from '../../../server/modules/email/outbox'
import { buildSnapshot, snapshotHash } from '../../../server/modules/estimates/estimate-snapshot'
import { issueEstimateLink, revokeEstimateLinks } from '../../../server/modules/portal/estimate-links.repo'
import { calculateEstimate } from '../../../shared/estimate'
import { type EstimateDraft, type EstimateSnapshot, snapshotToEngineInput } from '../../../shared/schemas/estimates'
import { type SentEstimate, makeSentEstimate, tinyDraft } from './estimates'
import { type Browser, type Fixture, browser } from './fixtures'

/**
 * Three items at 20% VAT, tax-exclusive, with a 20% deposit; the swivel bearing can only be done
 * with the seals (it `requires` them), the prop shaft UJ stands alone.
 */
export function portalDraft(overrides: Partial<EstimateDraft> = {}): EstimateDraft {
  return tinyDraft({
    items: [
      {
        id: 'seals',
        findingId: null,
        title: 'Swivel housing seal — left',
        severity: 'soon',
        customerNote: 'Oil is weeping past the seal onto the brake disc.',
        requires: [],
        lines: [
          {
            kind: 'labour',
            id: 'l1',
            description: 'Replace swivel seal',
            hours: '3',
            rate: 7200,
            taxRate: '20',
            accessSteps: [],
            operationCode: null,
            category: null,
          },
          { kind: 'part', id: 'p1', description: 'Swivel seal kit', quantity: '1', unitPrice: 6480, taxRate: '20', partNumber: null },
        ],
      },
      {
        id: 'uj',
        findingId: null,
        title: 'Front prop shaft UJ',
        severity: 'urgent',
        customerNote: 'The joint knocks when drive is taken up.',
        requires: [],
        lines: [
          {
            kind: 'labour',
            id: 'l2',
            description: 'Replace UJ',
            hours: '1.2',
            rate: 7200,
            taxRate: '20',
            accessSteps: [],
            operationCode: null,
            category: null,
          },
          { kind: 'part', id: 'p2', description: 'Universal joint', quantity: '1', unitPrice: 2895, taxRate: '20', partNumber: null },
        ],
      },
      {
        id: 'bearing',
        findingId: null,
        title: 'Swivel bearing preload',
        severity: 'watch',
        customerNote: '',
        requires: ['seals'],
        lines: [
          {
            kind: 'labour',
            id: 'l3',
            description: 'Set swivel bearing preload',
            hours: '0.8',
            rate: 7200,
            taxRate: '20',
            accessSteps: [],
            operationCode: null,
            category: null,
          },
        ],
      },
    ],
    deposit: { kind: 'percent', value: '20' },
    ...overrides,
  })
}

export const WORKSHOP_EMAIL = 'desk@portal-fixture.test'

/** The query handle a fake repository is given: it never looks at it, the service only hands it back. */
export const fakeTx = {} as Tx

/** An outbox that keeps what it is asked to send, for tests of services on fake repositories. */
export function fakeOutbox(): EmailOutbox & { queued: OutboundMessage[] } {
  const queued: OutboundMessage[] = []
  return {
    queued,
    queue: async (message) => {
      queued.push(message)
      return { id: `email-${queued.length}` }
    },
    resend: async () => undefined,
  }
}

/** `portalDraft()` frozen as sending would freeze it, without the database: for tests of services on fake repositories. */
export function portalSnapshot(opts: {
  estimateId: string
  version?: number
  customer: EstimateSnapshot['customer']
  workshopName?: string
}): EstimateSnapshot {
  return buildSnapshot({
    estimate: { id: opts.estimateId, number: 42 },
    version: opts.version ?? 1,
    draft: portalDraft(),
    currency: 'GBP',
    workshop: {
      name: opts.workshopName ?? 'Ridgeway 4x4',
      addressLines: ['1 Ridgeway'],
      postcode: 'OX1 1AA',
      phone: null,
      email: WORKSHOP_EMAIL,
      vatNumber: null,
    },
    customer: opts.customer,
    vehicle: { registration: 'AB12 CDE', make: 'Land Rover', model: 'Defender', year: 2004, vin: null },
  })
}

export interface LinkedEstimate extends SentEstimate {
  token: string
}

/** Rewrites a version's snapshot and its hash together, as a send would have made them. */
async function rewriteSnapshot(db: Database, versionId: string, snapshot: EstimateSnapshot) {
  const hash = snapshotHash(snapshot)
  const [version] = await db
    .update(estimateVersions)
    .set({ snapshot, hash, proposedGross: calculateEstimate(snapshotToEngineInput(snapshot)).proposed.gross })
    .where(eq(estimateVersions.id, versionId))
    .returning()
  if (!version) throw new Error('no version')
  return version
}

/**
 * A sent version with the workshop's e-mail in its snapshot, optional photos on items, and a link
 * issued the way sending issues it. `linkExpiresAt` defaults to 14 days ahead.
 */
export async function sendWithLink(
  db: Database,
  fx: Fixture,
  opts: { draft?: EstimateDraft; photoIds?: Record<string, string[]>; linkExpiresAt?: Date } = {},
): Promise<LinkedEstimate> {
  const sent = await makeSentEstimate(
    db,
    { ...fx, workshop: { ...fx.workshop, email: WORKSHOP_EMAIL } },
    { draft: opts.draft ?? portalDraft() },
  )
  let { snapshot, version } = sent
  if (opts.photoIds) {
    const ids = opts.photoIds
    snapshot = { ...snapshot, items: snapshot.items.map((i) => ({ ...i, photoIds: ids[i.id] ?? [] })) }
    version = await rewriteSnapshot(db, version.id, snapshot)
  }
  const token = await issueEstimateLink(db, {
    workshopId: fx.workshop.id,
    versionId: version.id,
    customerId: snapshot.customer.id,
    expiresAt: opts.linkExpiresAt ?? new Date(Date.now() + 14 * 86_400_000),
  })
  return { ...sent, snapshot, version, token }
}

/** What sending again does: a new version, the old one superseded, its links revoked, a new link. */
export async function sendNextVersion(
  db: Database,
  sent: LinkedEstimate,
  change: (s: EstimateSnapshot) => EstimateSnapshot = (s) => s,
): Promise<LinkedEstimate> {
  const snapshot = change({ ...sent.snapshot, version: sent.version.version + 1 })
  const [version] = await db
    .insert(estimateVersions)
    .values({
      workshopId: sent.version.workshopId,
      estimateId: sent.estimate.id,
      version: snapshot.version,
      snapshot,
      hash: snapshotHash(snapshot),
      proposedGross: calculateEstimate(snapshotToEngineInput(snapshot)).proposed.gross,
      expiresOn: snapshot.expiresOn,
    })
    .returning()
  if (!version) throw new Error('no version')
  await db
    .update(estimateVersions)
    .set({ supersededAt: sql`now()` })
    .where(eq(estimateVersions.id, sent.version.id))
  await revokeEstimateLinks(db, sent.version.workshopId, sent.estimate.id, version.id)
  const token = await issueEstimateLink(db, {
    workshopId: version.workshopId,
    versionId: version.id,
    customerId: snapshot.customer.id,
    expiresAt: new Date(Date.now() + 14 * 86_400_000),
  })
  return { ...sent, snapshot, version, token }
}

/** Another customer of the fixture's workshop, with a vehicle and a job of their own. */
export async function addCustomer(db: Database, fx: Fixture, name: string): Promise<Fixture> {
  const tag = Math.random().toString(36).slice(2, 8)
  const [customer] = await db
    .insert(customers)
    .values({ workshopId: fx.workshop.id, name, email: `${tag}-${name.split(' ')[0]?.toLowerCase()}@fixture.test` })
    .returning()
  if (!customer) throw new Error('no customer')
  const [vehicle] = await db
    .insert(vehicles)
    .values({
      workshopId: fx.workshop.id,
      customerId: customer.id,
      registration: `PX${tag.slice(0, 4).toUpperCase()}`,
      make: 'Testmake',
      model: 'Ranger',
    })
    .returning()
  if (!vehicle) throw new Error('no vehicle')
  const [job] = await db
    .insert(jobs)
    .values({ workshopId: fx.workshop.id, vehicleId: vehicle.id, concern: 'Vibration at speed' })
    .returning()
  if (!job) throw new Error('no job')
  return { ...fx, customer, vehicle, job }
}

/** A finding on the fixture's job with one stored photo; returns the photo's id and its bytes. */
export async function addPhoto(db: Database, storage: FileStorage, fx: Fixture): Promise<{ id: string; data: Buffer }> {
  const [finding] = await db
    .insert(findings)
    .values({
      workshopId: fx.workshop.id,
      jobId: fx.job.id,
      title: 'Swivel seal weeping',
      severity: 'soon',
      explanation: { what: 'Seal weeping', why: 'Oil on the disc', ifLeft: 'Brake contamination' },
    })
    .returning()
  if (!finding) throw new Error('no finding')
  const data = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#5a6b3c' } })
    .jpeg({ quality: 60 })
    .toBuffer()
  const thumb = await sharp(data).resize(32).jpeg({ quality: 60 }).toBuffer()
  const [photo] = await db
    .insert(photos)
    .values({
      workshopId: fx.workshop.id,
      findingId: finding.id,
      storageKey: await storage.put(data, 'jpg'),
      thumbKey: await storage.put(thumb, 'jpg'),
      contentType: 'image/jpeg',
      width: 64,
      height: 48,
      bytes: data.length,
    })
    .returning()
  if (!photo) throw new Error('no photo')
  return { id: photo.id, data }
}

/** A browser that opened the estimate link (and so is signed in as its customer). */
export async function openLink(app: Express, token: string, b: Browser = browser(app)): Promise<Browser> {
  const res = await b.post('/api/portal/open', { token })
  if (res.status !== 200) throw new Error(`opening the link answered ${res.status}: ${JSON.stringify(res.body)}`)
  return b
}

export async function versionRow(db: Database, id: string) {
  const [row] = await db.select().from(estimateVersions).where(eq(estimateVersions.id, id))
  if (!row) throw new Error('no version')
  return row
}
