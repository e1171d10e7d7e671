import { randomUUID } from 'node:crypto'
import { describe, expect, it } from 'vitest'
import type { Tx } from '../../server/db/client'
import type { AuditContext, AuditEntry } from '../../server/lib/audit'
import { AppError, ConflictError, ValidationError } from '../../server/lib/errors'
import type { EmailOutbox, OutboundMessage } from '../../server/modules/email/outbox'
import type { EstimateRow, EstimatesRepo, NewVersion, VersionRecord, VersionRow } from '../../server/modules/estimates/estimates.repo'
import { buildSnapshot } from '../../server/modules/estimates/estimate-snapshot'
import { createEstimatesService } from '../../server/modules/estimates/estimates.service'
import type { EstimateLinks } from '../../server/modules/portal/estimate-links.repo'
import type { StaffPrincipal } from '../../shared/schemas/auth'
import { DEFAULT_ESTIMATE_DEFAULTS } from '../../shared/schemas/estimates'
import type { JobStatus } from '../../shared/schemas/records'
import type { LiveEvent } from '../../shared/schemas/live'
import { tinyDraft } from './helpers/estimates'

/**
 * The estimate send rules against fake repositories: no database, so each rule is seen on its own.
 * Names and addresses are invented demo content.
 */

// The fakes never look inside the transaction handle; the service only passes it along.
const tx = {} as Tx
const notUsed = (): never => {
  throw new Error('not used when sending')
}

const TODAY = '2026-06-01'
const EXPIRES = '2026-06-15'
const BASE_URL = 'https://tickover.example.test'

function makeRow(): EstimateRow {
  const stamps = { createdAt: new Date('2026-05-30T09:00:00Z'), updatedAt: new Date('2026-05-30T09:00:00Z') }
  const workshopId = randomUUID()
  const customerId = randomUUID()
  const vehicleId = randomUUID()
  const jobId = randomUUID()
  return {
    workshop: {
      id: workshopId,
      name: 'Brackenfold 4x4 Works',
      addressLines: ['Unit 3, Mill Lane'],
      postcode: 'BF1 2AA',
      phone: '01632 960123',
      email: 'desk@brackenfold4x4.test',
      vatNumber: null,
      currency: 'GBP',
      timezone: 'Europe/London',
      estimateDefaults: DEFAULT_ESTIMATE_DEFAULTS,
      ...stamps,
    },
    customer: {
      id: customerId,
      workshopId,
      name: 'Rhian Calloway',
      email: 'rhian.calloway@example.test',
      phone: '07700 900123',
      addressLines: ['4 Tarn Row'],
      postcode: 'BF3 9QD',
      contactByEmail: true,
      contactByPhone: false,
      contactBySms: false,
      archivedAt: null,
      ...stamps,
    },
    vehicle: {
      id: vehicleId,
      workshopId,
      customerId,
      registration: 'BF12 KTX',
      vin: null,
      make: 'Harrowgate',
      model: 'Ridgeback 110',
      year: 2012,
      odometer: null,
      odometerUnit: 'mi',
      vehicleGroup: null,
      archivedAt: null,
      ...stamps,
    },
    job: {
      id: jobId,
      workshopId,
      vehicleId,
      concern: 'Clicking from the front on full lock',
      status: 'quoting',
      technicianId: null,
      bookedFor: null,
      promisedFor: null,
      ...stamps,
    },
    estimate: {
      id: randomUUID(),
      workshopId,
      jobId,
      number: 42,
      draft: tinyDraft({ expiresOn: EXPIRES }),
      revision: 1,
      sentRevision: null,
      withdrawnAt: null,
      createdBy: null,
      ...stamps,
    },
  }
}

/** An estimate as the fakes hold it, and everything the service asked them to do. */
function makeWorld() {
  const row = makeRow()
  const world = {
    row,
    today: TODAY,
    versions: [] as VersionRow[],
    inserted: [] as NewVersion[],
    superseded: [] as string[],
    jobMoves: [] as { jobId: string; from: JobStatus[]; to: JobStatus }[],
    revoked: [] as { estimateId: string; keepVersionId?: string }[],
    issued: [] as { versionId: string; customerId: string }[],
    queued: [] as { message: OutboundMessage; inTransaction: boolean }[],
    audits: [] as { ctx: AuditContext | null; entry: AuditEntry }[],
    live: [] as Omit<LiveEvent, 'at'>[],
  }

  const repo: EstimatesRepo = {
    db: tx,
    transaction: (fn) => fn(tx),
    async setJobStatus(_q, _workshopId, jobId, from, to) {
      world.jobMoves.push({ jobId, from: [...from], to })
      if (!from.includes(row.job.status)) return false
      row.job.status = to
      return true
    },
    async recordAudit(_q, ctx, entry) {
      world.audits.push({ ctx, entry })
    },
    async publishLive(_q, event) {
      world.live.push(event)
    },
    today: async () => world.today,
    lockJobEstimates: notUsed,
    nextNumber: notUsed,
    list: notUsed,
    status: async () => (world.versions.length > 0 ? 'sent' : 'draft'),
    find: async () => ({ ...row, estimate: { ...row.estimate }, customer: { ...row.customer } }),
    findJob: notUsed,
    openEstimateForJob: notUsed,
    versions: async () => world.versions,
    sentVersion: notUsed,
    decisions: async () => [],
    emails: async () => [],
    jobFindings: async () => [],
    findingsByIds: async () => [],
    photoIdsOf: async () => new Map(),
    partsForCodes: notUsed,
    insertEstimate: notUsed,
    saveDraft: notUsed,
    async markSent(_tx, _workshopId, _id, revision) {
      row.estimate.sentRevision = revision
    },
    markWithdrawn: notUsed,
    async insertVersion(_tx, values) {
      world.inserted.push(values)
      const version: VersionRecord = {
        ...values,
        id: randomUUID(),
        sentAt: new Date(),
        supersededAt: null,
        openedAt: null,
        confirmedAt: null,
      }
      world.versions.push({ version, confirmation: null, deposit: null })
      return version
    },
    async supersedeVersion(_tx, _workshopId, versionId) {
      world.superseded.push(versionId)
      const v = world.versions.find((x) => x.version.id === versionId)
      if (v) v.version.supersededAt = new Date()
    },
    estimateDefaults: notUsed,
    saveEstimateDefaults: notUsed,
  }

  const links: EstimateLinks = {
    async revoke(_tx, _workshopId, estimateId, keepVersionId) {
      world.revoked.push({ estimateId, keepVersionId })
    },
    async issue(_tx, link) {
      world.issued.push({ versionId: link.versionId, customerId: link.customerId })
      return `token-${world.issued.length}`
    },
  }

  const outbox: EmailOutbox = {
    async queue(message, q) {
      world.queued.push({ message, inTransaction: q === tx })
      return { id: randomUUID() }
    },
    resend: notUsed,
  }

  const service = createEstimatesService({
    repo,
    items: { fromFindings: notUsed },
    links,
    outbox,
    env: { PUBLIC_BASE_URL: BASE_URL },
    logger: { info: () => undefined },
  })

  const me: StaffPrincipal = {
    kind: 'staff',
    id: randomUUID(),
    name: 'Dafydd Pryce',
    email: 'dafydd@brackenfold4x4.test',
    role: 'advisor',
    workshop: { id: row.workshop.id, name: row.workshop.name, currency: 'GBP', timezone: 'Europe/London' },
  }
  const ctx: AuditContext = {
    actor: { kind: 'staff', id: me.id, name: me.name },
    workshopId: row.workshop.id,
    ip: '203.0.113.7',
    userAgent: 'vitest',
    requestId: 'req-1',
  }
  const send = (revision = row.estimate.revision) => service.send(ctx, me, row.estimate.id, { revision })

  /** What sending the version before this one would have left behind. */
  function alreadySentOnce() {
    const version: VersionRecord = {
      id: randomUUID(),
      workshopId: row.workshop.id,
      estimateId: row.estimate.id,
      version: 1,
      snapshot: buildSnapshot({
        estimate: row.estimate,
        version: 1,
        draft: row.estimate.draft,
        currency: row.workshop.currency,
        workshop: row.workshop,
        customer: row.customer,
        vehicle: row.vehicle,
      }),
      hash: 'a'.repeat(64),
      proposedGross: 32340,
      expiresOn: EXPIRES,
      sentAt: new Date('2026-05-30T10:00:00Z'),
      sentBy: me.id,
      supersededAt: null,
      openedAt: null,
      confirmedAt: null,
    }
    world.versions.push({ version, confirmation: null, deposit: null })
    row.estimate.sentRevision = 1
    row.estimate.revision = 2
    row.job.status = 'waiting_for_customer'
    return version
  }

  return { world, row, ctx, send, alreadySentOnce }
}

async function refusal(p: Promise<unknown>): Promise<AppError> {
  const err = await p.then(
    () => undefined,
    (e: unknown) => e,
  )
  if (!(err instanceof AppError)) throw new Error(`expected a refusal, got ${String(err)}`)
  return err
}

describe('sending an estimate (service rules, fake repositories)', () => {
  it('freezes the draft as version 1, links it, e-mails the customer once, moves the job and writes one audit entry', async () => {
    const { world, row, ctx, send } = makeWorld()
    const detail = await send()

    expect(world.inserted).toHaveLength(1)
    const [frozen] = world.inserted
    expect(frozen).toMatchObject({ estimateId: row.estimate.id, version: 1, expiresOn: EXPIRES, sentBy: expect.any(String) })
    // tinyDraft: 2.5 h at £72.00 + one part at £89.50, 20% VAT = £323.40 gross.
    expect(frozen?.proposedGross).toBe(32340)
    expect(frozen?.snapshot.items.map((i) => i.title)).toEqual(['Replace front left CV joint'])
    expect(frozen?.hash).toMatch(/^[0-9a-f]{64}$/)
    expect(world.superseded).toEqual([])

    const saved = world.versions[0]?.version
    expect(world.revoked).toEqual([{ estimateId: row.estimate.id, keepVersionId: saved?.id }])
    expect(world.issued).toEqual([{ versionId: saved?.id, customerId: row.customer.id }])
    expect(row.estimate.sentRevision).toBe(1)

    expect(world.jobMoves).toHaveLength(1)
    expect(world.jobMoves[0]?.to).toBe('waiting_for_customer')
    expect(row.job.status).toBe('waiting_for_customer')

    expect(world.queued).toHaveLength(1)
    const mail = world.queued[0]
    expect(mail?.inTransaction).toBe(true)
    expect(mail?.message).toMatchObject({
      kind: 'estimate.sent',
      to: 'rhian.calloway@example.test',
      estimateId: row.estimate.id,
      subject: 'Estimate E-0042 from Brackenfold 4x4 Works',
      replyTo: 'desk@brackenfold4x4.test',
    })
    expect(mail?.message.text).toContain(`${BASE_URL}/portal/open?token=token-1`)
    expect(mail?.message.text).not.toContain('replaces it')

    expect(world.audits).toHaveLength(1)
    expect(world.audits[0]?.ctx).toBe(ctx)
    expect(world.audits[0]?.entry).toMatchObject({
      action: 'estimate.sent',
      workshopId: row.workshop.id,
      subject: { type: 'estimate', id: row.estimate.id },
      details: { version: 1, proposedGross: 32340, to: 'rhian.calloway@example.test' },
    })
    expect(world.live.map((e) => e.type)).toEqual(['estimate.sent'])

    expect(detail.status).toBe('sent')
    expect(detail.hasUnsentChanges).toBe(false)
    expect(detail.versions.map((v) => v.version)).toEqual([1])
  })

  it('sends a changed draft as version n+1, supersedes version n and revokes its links', async () => {
    const { world, row, send, alreadySentOnce } = makeWorld()
    const first = alreadySentOnce()
    await send(2)

    expect(world.inserted.map((v) => v.version)).toEqual([2])
    expect(world.superseded).toEqual([first.id])
    const second = world.versions[1]?.version
    expect(world.revoked).toEqual([{ estimateId: row.estimate.id, keepVersionId: second?.id }])
    expect(world.issued.map((l) => l.versionId)).toEqual([second?.id])
    expect(row.estimate.sentRevision).toBe(2)
    expect(world.queued).toHaveLength(1)
    expect(world.queued[0]?.message.subject).toBe('Estimate E-0042 (version 2) from Brackenfold 4x4 Works')
    expect(world.queued[0]?.message.text).toContain('this one replaces it')
    expect(world.audits).toHaveLength(1)
  })

  const refusals: {
    name: string
    arrange: (w: ReturnType<typeof makeWorld>) => void
    revision?: number
    kind: typeof ValidationError | typeof ConflictError
    code: string
    path?: string
  }[] = [
    {
      name: 'an estimate with no items',
      arrange: ({ row }) => (row.estimate.draft = { ...row.estimate.draft, items: [] }),
      kind: ValidationError,
      code: 'validation_failed',
      path: 'draft.items',
    },
    {
      name: 'a customer with no e-mail address',
      arrange: ({ row }) => (row.customer.email = null),
      kind: ValidationError,
      code: 'validation_failed',
      path: 'customer.email',
    },
    {
      name: 'an expiry date in the past',
      arrange: ({ world }) => (world.today = '2026-06-16'),
      kind: ValidationError,
      code: 'validation_failed',
      path: 'draft.expiresOn',
    },
    {
      name: 'a withdrawn estimate',
      arrange: ({ row }) => (row.estimate.withdrawnAt = new Date('2026-05-31T12:00:00Z')),
      kind: ConflictError,
      code: 'withdrawn',
    },
    { name: 'a stale revision', arrange: () => undefined, revision: 0, kind: ConflictError, code: 'stale_revision' },
    {
      name: 'a revision already sent',
      arrange: ({ row }) => (row.estimate.sentRevision = row.estimate.revision),
      kind: ConflictError,
      code: 'already_sent',
    },
  ]

  for (const r of refusals) {
    it(`refuses ${r.name}, and writes nothing`, async () => {
      const w = makeWorld()
      r.arrange(w)
      const sentRevision = w.row.estimate.sentRevision
      const err = await refusal(w.send(r.revision))
      expect(err).toBeInstanceOf(r.kind)
      expect(err.code).toBe(r.code)
      if (r.path) expect(err.issues?.map((i) => i.path.join('.'))).toContain(r.path)
      const { world } = w
      expect(world.inserted).toEqual([])
      expect(world.superseded).toEqual([])
      expect(world.revoked).toEqual([])
      expect(world.issued).toEqual([])
      expect(world.jobMoves).toEqual([])
      expect(world.queued).toEqual([])
      expect(world.audits).toEqual([])
      expect(world.live).toEqual([])
      expect(w.row.estimate.sentRevision).toBe(sentRevision)
    })
  }
})
