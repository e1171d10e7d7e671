import type { Logger } from 'pino'
import type { Env } from '../../env'
import type { AuditContext } from '../../lib/audit'
import { ConflictError, NotFoundError, ValidationError, type ErrorIssue } from '../../lib/errors'
import type { EmailOutbox } from '../email/outbox'
import { estimateLinkUrl } from '../portal/estimate-links'
import type { EstimateLinks } from '../portal/estimate-links.repo'
import type { EstimateRow, EstimatesRepo, FindingRecord, Queryable, Tx } from './estimates.repo'
import { estimateDetail, estimateSummary } from './estimate-detail'
import type { EstimateItems } from './estimate-items'
import { buildSnapshot, snapshotHash } from './estimate-snapshot'
import { estimateSentEmail } from './estimates.emails'
import type { StaffPrincipal } from '../../../shared/schemas/auth'
import type { Page } from '../../../shared/schemas/common'
import {
  DEFAULT_ESTIMATE_DEFAULTS,
  EstimateDefaultsSchema,
  draftToEngineInput,
  estimateReference,
  snapshotToEngineInput,
  type AddFindings,
  type CreateEstimate,
  type EstimateDefaults,
  type EstimateDraft,
  type EstimateListQuery,
  type EstimateSummary,
  type SaveDraft,
  type SendEstimate,
} from '../../../shared/schemas/estimates'
import { calculateEstimate, safeCalculateEstimate } from '../../../shared/estimate'

export interface EstimatesServiceDeps {
  repo: EstimatesRepo
  items: Pick<EstimateItems, 'fromFindings'>
  links: EstimateLinks
  outbox: EmailOutbox
  env: Pick<Env, 'PUBLIC_BASE_URL'>
  logger: Pick<Logger, 'info'>
}

/** Job statuses from which sending an estimate leaves the job waiting for the customer. */
const SENDABLE_FROM = ['booked_in', 'inspecting', 'quoting', 'waiting_for_customer', 'in_work'] as const

function addDays(isoDate: string, days: number): string {
  const d = new Date(`${isoDate}T00:00:00Z`)
  d.setUTCDate(d.getUTCDate() + days)
  return d.toISOString().slice(0, 10)
}

function defaultsOf(value: unknown): EstimateDefaults {
  const parsed = EstimateDefaultsSchema.safeParse(value)
  return parsed.success ? parsed.data : DEFAULT_ESTIMATE_DEFAULTS
}

function engineIssues(draft: EstimateDraft, currency: string): ErrorIssue[] {
  const result = safeCalculateEstimate(draftToEngineInput(draft, currency))
  if (result.success) return []
  return result.issues.map((i) => ({
    path: ['draft', ...i.path.map((p) => (typeof p === 'symbol' ? String(p) : p))],
    message: i.message,
  }))
}

function refuseWithdrawn(row: EstimateRow) {
  if (row.estimate.withdrawnAt) throw new ConflictError('This estimate was withdrawn; start a new one for the job.', 'withdrawn')
}

function refuseStale(row: EstimateRow, revision: number) {
  if (row.estimate.revision !== revision) {
    throw new ConflictError('Someone else changed this estimate since you opened it. Reload to see their changes.', 'stale_revision')
  }
}

/** What stops a draft going to the customer: nothing to decide on, nowhere to send it, a date gone by, lines the engine refuses. */
function sendProblems(row: EstimateRow, today: string): ErrorIssue[] {
  const { draft } = row.estimate
  const problems: ErrorIssue[] = []
  if (draft.items.length === 0) problems.push({ path: ['draft', 'items'], message: 'Add at least one item before sending.' })
  if (!row.customer.email)
    problems.push({
      path: ['customer', 'email'],
      message: `${row.customer.name} has no e-mail address; add one to the customer first.`,
    })
  if (draft.expiresOn < today) problems.push({ path: ['draft', 'expiresOn'], message: 'The expiry date has passed; choose a later date.' })
  problems.push(...engineIssues(draft, row.workshop.currency))
  return problems
}

export function createEstimatesService(deps: EstimatesServiceDeps) {
  const { repo, items, links, outbox, env } = deps
  const db = repo.db

  async function load(q: Queryable, workshopId: string, id: string, lock = false): Promise<EstimateRow> {
    const row = await repo.find(q, workshopId, id, lock)
    if (!row) throw new NotFoundError('No such estimate in this workshop.')
    return row
  }

  const detail = (q: Queryable, row: EstimateRow, notices?: string[]) => estimateDetail(repo, q, row, notices)

  async function saveDraftRow(tx: Tx, row: EstimateRow, draft: EstimateDraft): Promise<EstimateRow> {
    const saved = await repo.saveDraft(tx, row.estimate.workshopId, row.estimate.id, draft, row.estimate.revision + 1)
    if (!saved) throw new NotFoundError('No such estimate in this workshop.')
    await repo.publishLive(tx, { type: 'estimate.changed', workshopId: row.estimate.workshopId, estimateId: row.estimate.id })
    return { ...row, estimate: saved }
  }

  /** The findings of `ids` in that order, and how many of the ids are not findings of the job. */
  async function findingsOfJob(tx: Tx, workshopId: string, jobId: string, ids: string[]) {
    const rows = await repo.findingsByIds(tx, workshopId, ids)
    const ordered = ids.map((fid) => rows.find((r) => r.id === fid && r.jobId === jobId))
    const found = ordered.filter((r): r is FindingRecord => r !== undefined)
    return { found, strays: ordered.length - found.length }
  }

  return {
    async list(workshopId: string, q: EstimateListQuery): Promise<Page<EstimateSummary>> {
      const { rows, total } = await repo.list(workshopId, q)
      return { items: rows.map(estimateSummary), total, page: q.page, pageSize: q.pageSize }
    },

    async get(workshopId: string, id: string) {
      return detail(db, await load(db, workshopId, id))
    },

    async create(ctx: AuditContext, me: StaffPrincipal, input: CreateEstimate) {
      const workshopId = me.workshop.id
      const made = await repo.transaction(async (tx) => {
        const job = await repo.findJob(tx, workshopId, input.jobId)
        if (!job) throw new NotFoundError('No such job in this workshop.')
        // One open estimate per job: revisions are versions of it, not new estimates.
        await repo.lockJobEstimates(tx, input.jobId)
        const open = await repo.openEstimateForJob(tx, workshopId, input.jobId)
        if (open)
          throw new ConflictError(
            `This job already has estimate ${estimateReference(open.number)}; open it to make changes.`,
            'estimate_exists',
          )
        const defaults = defaultsOf(job.workshop.estimateDefaults)
        let draft: EstimateDraft = {
          items: [],
          accessSteps: [],
          taxMode: defaults.taxMode,
          taxRounding: defaults.taxRounding,
          discount: defaults.discount,
          deposit: defaults.deposit,
          expiresOn: addDays(await repo.today(tx, job.workshop.timezone), defaults.expiryDays),
          message: '',
        }
        let notices: string[] = []
        if (input.findingIds.length > 0) {
          const { found, strays } = await findingsOfJob(tx, workshopId, input.jobId, input.findingIds)
          if (strays > 0)
            throw new ValidationError(
              'Some findings are not from this job.',
              Array.from({ length: strays }, () => ({ path: ['findingIds'], message: 'Not a finding of this job' })),
            )
          const built = await items.fromFindings(tx, workshopId, draft, found)
          draft = { ...draft, items: built.items, accessSteps: built.accessSteps }
          notices = built.notices
        }
        const number = await repo.nextNumber(tx, workshopId)
        const estimate = await repo.insertEstimate(tx, { workshopId, jobId: input.jobId, number, draft, createdBy: me.id })
        await repo.setJobStatus(tx, workshopId, job.job.id, ['booked_in', 'inspecting'], 'quoting')
        await repo.recordAudit(tx, ctx, {
          action: 'estimate.created',
          workshopId,
          subject: { type: 'estimate', id: estimate.id },
          details: { reference: estimateReference(number) },
        })
        await repo.publishLive(tx, { type: 'estimate.changed', workshopId, estimateId: estimate.id, status: 'draft' })
        return { id: estimate.id, notices }
      })
      return detail(db, await load(db, workshopId, made.id), made.notices)
    },

    async saveDraft(me: StaffPrincipal, id: string, input: SaveDraft) {
      const workshopId = me.workshop.id
      const saved = await repo.transaction(async (tx) => {
        const row = await load(tx, workshopId, id, true)
        refuseWithdrawn(row)
        refuseStale(row, input.revision)
        const issues = engineIssues(input.draft, row.workshop.currency)
        if (issues.length > 0) throw new ValidationError('Some lines need correcting before the estimate can be saved.', issues)
        const findingIds = input.draft.items.flatMap((i) => (i.findingId ? [i.findingId] : []))
        if (findingIds.length > 0) {
          const found = await repo.findingsByIds(tx, workshopId, findingIds)
          const bad = input.draft.items.flatMap((item, index) =>
            item.findingId && !found.some((f) => f.id === item.findingId && f.jobId === row.estimate.jobId)
              ? [{ path: ['draft', 'items', index, 'findingId'], message: 'Not a finding of this job' }]
              : [],
          )
          if (bad.length > 0) throw new ValidationError('Some items point at findings of another job.', bad)
        }
        return saveDraftRow(tx, row, input.draft)
      })
      return detail(db, saved)
    },

    async addFindings(me: StaffPrincipal, id: string, input: AddFindings) {
      const workshopId = me.workshop.id
      const result = await repo.transaction(async (tx) => {
        const row = await load(tx, workshopId, id, true)
        refuseWithdrawn(row)
        refuseStale(row, input.revision)
        const { found, strays } = await findingsOfJob(tx, workshopId, row.estimate.jobId, input.findingIds)
        if (strays > 0)
          throw new ValidationError('Some findings are not from this job.', [
            { path: ['findingIds'], message: 'Not a finding of this job' },
          ])
        const built = await items.fromFindings(tx, workshopId, row.estimate.draft, found)
        const draft = { ...row.estimate.draft, items: [...row.estimate.draft.items, ...built.items], accessSteps: built.accessSteps }
        if (draft.items.length > 200)
          throw new ValidationError('An estimate holds at most 200 items.', [{ path: ['findingIds'], message: 'Too many items' }])
        return { row: await saveDraftRow(tx, row, draft), notices: built.notices }
      })
      return detail(db, result.row, result.notices)
    },

    /**
     * Freezes the draft as the next version, replaces the customer's earlier link with one to it,
     * and queues the e-mail that carries the link; the job then waits for the customer.
     */
    async send(ctx: AuditContext, me: StaffPrincipal, id: string, input: SendEstimate) {
      const workshopId = me.workshop.id
      await repo.transaction(async (tx) => {
        const row = await load(tx, workshopId, id, true)
        refuseWithdrawn(row)
        refuseStale(row, input.revision)
        const problems = sendProblems(row, await repo.today(tx, row.workshop.timezone))
        const to = row.customer.email
        // A customer without an address is one of the problems; the test on `to` tells the compiler so.
        if (problems.length > 0 || !to) throw new ValidationError('The estimate cannot be sent yet.', problems)
        if (row.estimate.sentRevision === row.estimate.revision)
          throw new ConflictError('This version has already been sent; change something first or send the e-mail again.', 'already_sent')
        const { draft } = row.estimate

        const versions = await repo.versions(tx, workshopId, id)
        const previous = versions.at(-1)
        if (previous?.confirmation && previous.deposit?.status === 'paid') {
          // A new version after a paid deposit is allowed; the deposit stays with the version it paid for.
          deps.logger.info({ estimateId: id }, 'sending a new version after a paid deposit')
        }
        const findingIds = draft.items.flatMap((i) => (i.findingId ? [i.findingId] : []))
        const [findingRows, photoIds] = await Promise.all([
          repo.findingsByIds(tx, workshopId, findingIds),
          repo.photoIdsOf(tx, workshopId, findingIds),
        ])
        const version = (previous?.version.version ?? 0) + 1
        const snapshot = buildSnapshot({
          estimate: { id, number: row.estimate.number },
          version,
          draft,
          currency: row.workshop.currency,
          workshop: row.workshop,
          customer: row.customer,
          vehicle: row.vehicle,
          findings: new Map(
            findingRows.map((f) => [f.id, { explanation: f.explanation, measurement: f.measurement, photoIds: photoIds.get(f.id) ?? [] }]),
          ),
        })
        const result = calculateEstimate(snapshotToEngineInput(snapshot))
        const hash = snapshotHash(snapshot)
        const saved = await repo.insertVersion(tx, {
          workshopId,
          estimateId: id,
          version,
          snapshot,
          hash,
          proposedGross: result.proposed.gross,
          expiresOn: draft.expiresOn,
          sentBy: me.id,
        })
        if (previous) await repo.supersedeVersion(tx, workshopId, previous.version.id)
        await links.revoke(tx, workshopId, id, saved.id)
        const token = await links.issue(tx, { workshopId, versionId: saved.id, customerId: row.customer.id })
        await repo.markSent(tx, workshopId, id, row.estimate.revision)
        await repo.setJobStatus(tx, workshopId, row.estimate.jobId, SENDABLE_FROM, 'waiting_for_customer')
        const mail = estimateSentEmail(snapshot, estimateLinkUrl(env.PUBLIC_BASE_URL, token), result.proposed.gross, Boolean(previous))
        await outbox.queue(
          {
            workshopId,
            estimateId: id,
            kind: 'estimate.sent',
            to,
            subject: mail.subject,
            text: mail.text,
            html: mail.html,
            replyTo: row.workshop.email,
            fromName: row.workshop.name,
          },
          tx,
        )
        await repo.recordAudit(tx, ctx, {
          action: 'estimate.sent',
          workshopId,
          subject: { type: 'estimate', id },
          details: { reference: snapshot.reference, version, hash, proposedGross: result.proposed.gross, to },
        })
        await repo.publishLive(tx, {
          type: 'estimate.sent',
          workshopId,
          estimateId: id,
          status: 'sent',
          summary: `${snapshot.reference} version ${version} sent to ${row.customer.name}`,
        })
      })
      return detail(db, await load(db, workshopId, id))
    },

    async withdraw(ctx: AuditContext, me: StaffPrincipal, id: string) {
      const workshopId = me.workshop.id
      await repo.transaction(async (tx) => {
        const row = await load(tx, workshopId, id, true)
        refuseWithdrawn(row)
        await repo.markWithdrawn(tx, workshopId, id)
        await links.revoke(tx, workshopId, id)
        await repo.recordAudit(tx, ctx, {
          action: 'estimate.withdrawn',
          workshopId,
          subject: { type: 'estimate', id },
          details: { reference: estimateReference(row.estimate.number) },
        })
        await repo.publishLive(tx, { type: 'estimate.withdrawn', workshopId, estimateId: id, status: 'withdrawn' })
      })
      return detail(db, await load(db, workshopId, id))
    },

    async resendEmail(ctx: AuditContext, me: StaffPrincipal, id: string, emailId: string) {
      const workshopId = me.workshop.id
      const row = await load(db, workshopId, id)
      const emails = await repo.emails(db, workshopId, row.estimate.id)
      if (!emails.some((m) => m.id === emailId)) throw new NotFoundError('No such e-mail for this estimate.')
      await outbox.resend(workshopId, emailId)
      await repo.recordAudit(db, ctx, {
        action: 'estimate.email_resent',
        workshopId,
        subject: { type: 'estimate', id },
        details: { emailId },
      })
    },

    /** The id of the estimate's sent version `version`, for its PDF. */
    async versionId(workshopId: string, id: string, version: number): Promise<string> {
      const row = await load(db, workshopId, id)
      const v = (await repo.versions(db, workshopId, row.estimate.id)).find((x) => x.version.version === version)
      if (!v) throw new NotFoundError('No such version of this estimate.')
      return v.version.id
    },

    async getDefaults(workshopId: string): Promise<EstimateDefaults> {
      return defaultsOf(await repo.estimateDefaults(workshopId))
    },

    async saveDefaults(ctx: AuditContext, me: StaffPrincipal, input: EstimateDefaults): Promise<EstimateDefaults> {
      const before = defaultsOf(await repo.estimateDefaults(me.workshop.id))
      await repo.saveEstimateDefaults(me.workshop.id, input)
      await repo.recordAudit(db, ctx, {
        action: 'settings.changed',
        workshopId: me.workshop.id,
        subject: { type: 'estimate-defaults', id: me.workshop.id },
        details: { changed: { 'estimate defaults': { from: JSON.stringify(before), to: JSON.stringify(input) } } },
      })
      return input
    },
  }
}

export type EstimatesService = ReturnType<typeof createEstimatesService>
