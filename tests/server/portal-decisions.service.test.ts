/**
 * The portal's decision rules, on the service alone: the repository, the outbox, the deposits and
 * the file store are fakes that keep what they are given, so no database is involved.
 */
import { randomUUID } from 'node:crypto'
import { describe, expect, it } from 'vitest'
import type { AuditContext, AuditEntry } from '../../server/lib/audit'
import { snapshotHash } from '../../server/modules/estimates/estimate-snapshot'
import { createPortalDecisionsService, type PortalDecisionsDeps } from '../../server/modules/portal/portal-decisions.service'
import type { ConfirmedRow, VersionRow } from '../../server/modules/portal/portal.repo'
import { calculateEstimate } from '../../shared/estimate'
import type { Decision } from '../../shared/estimate/contract'
import type { CustomerPrincipal } from '../../shared/schemas/auth'
import type { JobStatus } from '../../shared/schemas/records'
import { type EstimateSnapshot, snapshotToEngineInput } from '../../shared/schemas/estimates'
import { fakeOutbox, fakeTx, portalSnapshot } from './helpers/portal'

type Repo = PortalDecisionsDeps['repo']

const workshopId = randomUUID()
const me: CustomerPrincipal = {
  kind: 'customer',
  id: randomUUID(),
  name: 'Dana Fielding',
  email: 'dana@fixture.test',
  workshop: { id: workshopId, name: 'Ridgeway 4x4', currency: 'GBP', timezone: 'Europe/London' },
}
const ctx: AuditContext = {
  actor: { kind: 'customer', id: me.id, name: me.name },
  workshopId,
  ip: '203.0.113.7',
  userAgent: 'Test browser 1.0',
  requestId: 'req-1',
}

function versionRow(estimateId: string, version: number, change: Partial<VersionRow> = {}): VersionRow {
  const snapshot = portalSnapshot({
    estimateId,
    version,
    customer: { id: me.id, name: me.name, email: me.email },
    workshopName: me.workshop.name,
  })
  return {
    id: randomUUID(),
    workshopId,
    estimateId,
    version,
    snapshot,
    hash: snapshotHash(snapshot),
    proposedGross: calculateEstimate(snapshotToEngineInput(snapshot)).proposed.gross,
    expiresOn: snapshot.expiresOn,
    sentAt: new Date(),
    sentBy: null,
    supersededAt: null,
    openedAt: new Date(),
    confirmedAt: null,
    expired: false,
    ...change,
  }
}

/** One estimate sent to `me`, its versions oldest first, and everything the service writes. */
function world(opts: { versions?: number; withdrawn?: boolean; latest?: Partial<VersionRow>; stored?: Record<string, Decision> } = {}) {
  const estimate = { id: randomUUID(), jobId: randomUUID(), withdrawnAt: opts.withdrawn ? new Date() : null }
  const count = opts.versions ?? 1
  const versions = Array.from({ length: count }, (_, i) =>
    versionRow(estimate.id, i + 1, i + 1 < count ? { supersededAt: new Date() } : opts.latest),
  )
  const stored = new Map<string, Record<string, Decision>>(versions.map((v) => [v.id, { ...opts.stored }]))
  const confirmations = new Map<string, ConfirmedRow>()
  const written = {
    saved: [] as { versionId: string; itemId: string; decision: Decision }[],
    audit: [] as { ctx: AuditContext | null; entry: AuditEntry }[],
    live: [] as { type: string; summary?: string }[],
    jobMoves: [] as { jobId: string; from: readonly JobStatus[]; to: JobStatus }[],
    checkouts: [] as { ctx: AuditContext; confirmationId: string }[],
  }
  const outbox = fakeOutbox()
  const mine = (ws: string, id: string) => ws === workshopId && id === estimate.id

  const repo: Repo = {
    db: fakeTx,
    transaction: (fn) => fn(fakeTx),
    estimate: async (_q, ws, id) => (mine(ws, id) ? { ...estimate, workshopTimezone: 'Europe/London' } : undefined),
    lockEstimate: async (_tx, ws, id) => (mine(ws, id) ? estimate : undefined),
    versions: async (_q, ws, id) => (mine(ws, id) ? versions : []),
    latestVersionNumber: async (_q, ws, id) => (mine(ws, id) ? versions.at(-1)?.version : undefined),
    lockVersion: async (_tx, ws, id, n) => (mine(ws, id) ? versions.find((v) => v.version === n) : undefined),
    decisions: async (_q, _ws, versionId) => ({ ...stored.get(versionId) }),
    saveDecision: async (_tx, row) => {
      written.saved.push({ versionId: row.versionId, itemId: row.itemId, decision: row.decision })
      stored.set(row.versionId, { ...stored.get(row.versionId), [row.itemId]: row.decision })
    },
    confirmation: async (_q, _ws, versionId) => confirmations.get(versionId),
    insertConfirmation: async (_tx, values) => {
      const row = { ...values, id: randomUUID(), ip: values.ip ?? null, userAgent: values.userAgent ?? null, confirmedAt: new Date() }
      confirmations.set(row.versionId, { confirmation: row, deposit: null })
      return row
    },
    markConfirmed: async () => undefined,
    setJobStatus: async (_q, _ws, jobId, from, to) => {
      written.jobMoves.push({ jobId, from, to })
      return true
    },
    questions: async () => [],
    photo: async () => undefined,
    recordAudit: async (_q, auditCtx, entry) => {
      written.audit.push({ ctx: auditCtx, entry })
    },
    publishLive: async (_q, event) => {
      written.live.push({ type: event.type, summary: event.summary })
    },
  }

  const service = createPortalDecisionsService({
    repo,
    outbox,
    deposits: {
      startCheckout: async (checkoutCtx, confirmationId) => {
        written.checkouts.push({ ctx: checkoutCtx, confirmationId })
        return { url: 'https://pay.example.test/page' }
      },
    },
    storage: { get: async () => Buffer.alloc(0) },
    env: { PUBLIC_BASE_URL: 'https://tickover.example.test' },
  })
  const latest = versions.at(-1) ?? versionRow(estimate.id, 1)
  return { service, estimate, versions, latest, confirmations, written, emails: outbox.queued }
}

const engine = (snapshot: EstimateSnapshot, decisions: Record<string, Decision>) =>
  calculateEstimate(snapshotToEngineInput(snapshot, decisions))

describe('deciding on an item', () => {
  it('saves the decision and answers with the engine’s figures for every item’s choice', async () => {
    const w = world()
    const answer = await w.service.decide(ctx, me, w.estimate.id, 'uj', { version: 1, decision: 'approved' })

    const expected = { seals: 'pending', uj: 'approved', bearing: 'pending' } as const
    expect(answer).toEqual({ version: 1, decisions: expected, result: engine(w.latest.snapshot, expected) })
    expect(answer.result.approved.gross).toBeGreaterThan(0)
    expect(w.written.saved).toEqual([{ versionId: w.latest.id, itemId: 'uj', decision: 'approved' }])
    expect(w.written.audit).toEqual([
      {
        ctx,
        entry: expect.objectContaining({
          action: 'estimate.decided',
          details: expect.objectContaining({ decision: 'approved', approvedGross: answer.result.approved.gross }),
        }),
      },
    ])
    expect(w.written.live).toEqual([{ type: 'estimate.decision', summary: `${me.name} approved item 2: Front prop shaft UJ` }])
  })

  const closed: [string, Parameters<typeof world>[0], Record<string, unknown>][] = [
    ['a withdrawn estimate with 410', { withdrawn: true }, { status: 410, code: 'withdrawn' }],
    [
      'a superseded version with 409, naming the newer one',
      { versions: 2 },
      { status: 409, code: 'superseded', details: { latestVersion: 2 } },
    ],
    ['an expired version with 410', { latest: { expired: true } }, { status: 410, code: 'expired' }],
    ['a confirmed version with 409', { latest: { confirmedAt: new Date() } }, { status: 409, code: 'confirmed' }],
  ]
  it.each(closed)('refuses %s and saves nothing', async (_case, state, refusal) => {
    const w = world(state)
    await expect(w.service.decide(ctx, me, w.estimate.id, 'uj', { version: 1, decision: 'approved' })).rejects.toMatchObject(refusal)
    expect(w.written.saved).toEqual([])
    expect(w.written.audit).toEqual([])
  })

  it('says until when an expired version could be decided on', async () => {
    const w = world({ latest: { expired: true } })
    await expect(w.service.decide(ctx, me, w.estimate.id, 'uj', { version: 1, decision: 'declined' })).rejects.toThrow(
      `This estimate could be decided on until the end of ${w.latest.expiresOn}.`,
    )
  })

  const seals = 'item 1 (Swivel housing seal — left)'
  const bearing = 'item 3 (Swivel bearing preload)'
  const broken: [string, Record<string, Decision>, string, Decision, string, string][] = [
    [
      'an approval whose required item is not approved, naming that item',
      {},
      'bearing',
      'approved',
      `Item 3 (Swivel bearing preload) can only be done together with ${seals}. Approve that item first, or decline this one.`,
      'seals',
    ],
    [
      'a decline that would leave an approved item without the item it requires, naming the approved one',
      { seals: 'approved', bearing: 'approved' },
      'seals',
      'declined',
      `You approved ${bearing}, which can only be done together with this item. Decline that item first, or keep this one approved.`,
      'bearing',
    ],
  ]
  it.each(broken)('refuses %s', async (_case, stored, itemId, decision, message, otherItem) => {
    const w = world({ stored })
    await expect(w.service.decide(ctx, me, w.estimate.id, itemId, { version: 1, decision })).rejects.toMatchObject({
      status: 422,
      code: 'requires',
      message,
      issues: [{ path: ['decisions', otherItem], message: `Item 3 (Swivel bearing preload) needs ${seals}` }],
    })
    expect(w.written.saved).toEqual([])
  })

  it('answers 404 for an estimate whose latest version was sent to someone else', async () => {
    const w = world()
    const stranger: CustomerPrincipal = { ...me, id: randomUUID() }
    await expect(w.service.decide(ctx, stranger, w.estimate.id, 'uj', { version: 1, decision: 'approved' })).rejects.toMatchObject({
      status: 404,
    })
  })
})

describe('confirming the decisions', () => {
  const consents = { startWithinCancellationPeriod: true, cancellationInformationShown: true } as const

  it('freezes the decisions with the engine’s figures, e-mails both sides, and leaves the job until the deposit is paid', async () => {
    const decided = { seals: 'approved', uj: 'declined', bearing: 'approved' } as const
    const w = world({ stored: decided })
    const { created, answer } = await w.service.confirm(ctx, me, w.estimate.id, { version: 1, hash: w.latest.hash, consents })

    const result = engine(w.latest.snapshot, decided)
    expect(result.approved.deposit).toBeGreaterThan(0)
    expect(created).toBe(true)
    expect(answer).toMatchObject({ depositDue: result.approved.deposit, next: 'pay' })
    const confirmed = await w.service.get(me, w.estimate.id)
    expect(confirmed.confirmation).toMatchObject({ decisions: decided, approvedGross: result.approved.gross })
    expect(confirmed.result).toEqual(result)
    expect(w.written.jobMoves).toEqual([])
    expect(w.emails.map((e) => e.kind)).toEqual(['estimate.confirmed', 'estimate.confirmed.copy'])
    expect(w.written.audit.map((a) => a.entry.action)).toEqual(['estimate.confirmed'])
  })

  it('keeps the IP address and browser of the confirming request with the record', async () => {
    const w = world({ stored: { seals: 'declined', uj: 'approved', bearing: 'declined' } })
    await w.service.confirm(ctx, me, w.estimate.id, { version: 1, hash: w.latest.hash, consents })
    expect(w.confirmations.get(w.latest.id)?.confirmation).toMatchObject({ ip: ctx.ip, userAgent: ctx.userAgent, customerId: me.id })
  })

  it('opens the deposit payment page with the caller’s context once confirmed', async () => {
    const w = world({ stored: { seals: 'approved', uj: 'approved', bearing: 'approved' } })
    const { answer } = await w.service.confirm(ctx, me, w.estimate.id, { version: 1, hash: w.latest.hash, consents })
    expect(await w.service.checkout(ctx, me, w.estimate.id)).toEqual({ url: 'https://pay.example.test/page' })
    expect(w.written.checkouts).toEqual([{ ctx, confirmationId: answer.confirmationId }])
  })

  it('refuses to confirm while an item is undecided, naming it', async () => {
    const w = world({ stored: { seals: 'approved', uj: 'approved' } })
    await expect(w.service.confirm(ctx, me, w.estimate.id, { version: 1, hash: w.latest.hash, consents })).rejects.toMatchObject({
      status: 422,
      code: 'undecided',
      message: 'Please approve or decline every item first: item 3 (Swivel bearing preload) is not decided yet.',
    })
  })
})
