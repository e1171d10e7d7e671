import { eq, sql } from 'drizzle-orm'
import type { Database } from '../../../server/db/client'
import { estimateConfirmations, estimates, estimateVersions } from '../../../server/db/schema'
import { buildSnapshot, snapshotHash } from '../../../server/modules/estimates/estimate-snapshot'
import { calculateEstimate } from '../../../shared/estimate'
import type { EstimateResult } from '../../../shared/estimate/contract'
import {
  type EstimateDraft,
  type EstimateDraftInput,
  EstimateDraftSchema,
  type EstimateSnapshot,
  estimateReference,
  snapshotToEngineInput,
} from '../../../shared/schemas/estimates'
import type { Fixture } from './fixtures'

/**
 * Estimates written straight into the tables, for tests of what comes after sending (links,
 * decisions, deposits) that should not depend on the staff estimate screens. Each call makes new
 * rows in the fixture's workshop; nothing is shared between tests.
 */

const isoDay = (daysFromToday: number) => new Date(Date.now() + daysFromToday * 86_400_000).toISOString().slice(0, 10)

/**
 * One item with a labour and a part line at 20% VAT, tax-exclusive, and a 25% deposit:
 * 2.5 h at £72.00 = £180.00 + one part at £89.50 = £269.50 net, £323.40 gross, deposit £80.85.
 */
export function tinyDraft(overrides: Partial<EstimateDraftInput> = {}): EstimateDraft {
  return EstimateDraftSchema.parse({
    items: [
      {
        id: 'item-1',
        title: 'Replace front left CV joint',
        severity: 'soon',
        customerNote: 'The joint clicks on full lock and its boot is split.',
        lines: [
          {
            kind: 'labour',
            id: 'line-1',
            description: 'Strip hub and replace CV joint',
            hours: '2.5',
            rate: 7200,
            taxRate: '20',
            accessSteps: [],
          },
          { kind: 'part', id: 'line-2', description: 'CV joint kit', quantity: '1', unitPrice: 8950, taxRate: '20' },
        ],
      },
    ],
    taxMode: 'exclusive',
    taxRounding: 'per-line',
    deposit: { kind: 'percent', value: '25' },
    expiresOn: isoDay(14),
    ...overrides,
  })
}

export interface SentEstimate {
  estimate: typeof estimates.$inferSelect
  version: typeof estimateVersions.$inferSelect
  snapshot: EstimateSnapshot
  reference: string
}

/** An estimate with its draft sent as version 1 (or `version`), as the send step would leave it. */
export async function makeSentEstimate(
  db: Database,
  fx: Fixture,
  opts: { draft?: EstimateDraft; version?: number } = {},
): Promise<SentEstimate> {
  const draft = opts.draft ?? tinyDraft()
  const versionNumber = opts.version ?? 1
  const counter = await db.execute<{ last_number: number }>(sql`
    insert into estimate_counters (workshop_id, last_number) values (${fx.workshop.id}, 1)
    on conflict (workshop_id) do update set last_number = estimate_counters.last_number + 1
    returning last_number`)
  const number = Number(counter.rows[0]?.last_number)
  const [estimate] = await db
    .insert(estimates)
    .values({ workshopId: fx.workshop.id, jobId: fx.job.id, number, draft, revision: 1, sentRevision: 1, createdBy: fx.advisor.id })
    .returning()
  if (!estimate) throw new Error('no estimate')
  const reference = estimateReference(number)
  const snapshot = buildSnapshot({
    estimate: { id: estimate.id, number },
    version: versionNumber,
    draft,
    currency: fx.workshop.currency,
    workshop: fx.workshop,
    customer: fx.customer,
    vehicle: fx.vehicle,
  })
  const proposed = calculateEstimate(snapshotToEngineInput(snapshot))
  const [version] = await db
    .insert(estimateVersions)
    .values({
      workshopId: fx.workshop.id,
      estimateId: estimate.id,
      version: versionNumber,
      snapshot,
      hash: snapshotHash(snapshot),
      proposedGross: proposed.proposed.gross,
      expiresOn: draft.expiresOn,
      sentBy: fx.advisor.id,
    })
    .returning()
  if (!version) throw new Error('no version')
  return { estimate, version, snapshot, reference }
}

export interface ConfirmedEstimate extends SentEstimate {
  confirmation: typeof estimateConfirmations.$inferSelect
  result: EstimateResult
}

/**
 * The customer's confirmation of a sent version: every item approved unless `decisions` says
 * otherwise, the deposit as the engine works it out unless `depositMinor` is given.
 */
export async function confirmVersion(
  db: Database,
  sent: SentEstimate,
  opts: { decisions?: Record<string, 'approved' | 'declined'>; depositMinor?: number } = {},
): Promise<ConfirmedEstimate> {
  const decisions = opts.decisions ?? Object.fromEntries(sent.snapshot.items.map((i) => [i.id, 'approved' as const]))
  const result = calculateEstimate(snapshotToEngineInput(sent.snapshot, decisions))
  const [confirmation] = await db
    .insert(estimateConfirmations)
    .values({
      workshopId: sent.version.workshopId,
      versionId: sent.version.id,
      customerId: sent.snapshot.customer.id,
      versionHash: sent.version.hash,
      decisions,
      consents: { startWithinCancellationPeriod: false, cancellationInformationShown: true },
      result,
      approvedGross: result.approved.gross,
      depositMinor: opts.depositMinor ?? result.approved.deposit,
      ip: '127.0.0.1',
      userAgent: 'fixture',
    })
    .returning()
  if (!confirmation) throw new Error('no confirmation')
  await db.update(estimateVersions).set({ confirmedAt: confirmation.confirmedAt }).where(eq(estimateVersions.id, sent.version.id))
  return { ...sent, confirmation, result }
}

/** Sent and confirmed in one step. */
export async function makeConfirmedEstimate(
  db: Database,
  fx: Fixture,
  opts: { draft?: EstimateDraft; decisions?: Record<string, 'approved' | 'declined'>; depositMinor?: number } = {},
): Promise<ConfirmedEstimate> {
  return confirmVersion(db, await makeSentEstimate(db, fx, { draft: opts.draft }), opts)
}
