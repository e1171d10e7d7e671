import { randomUUID } from 'node:crypto'
import type { Request } from 'express'
import { and, eq, sql } from 'drizzle-orm'
import type { Logger } from 'pino'
import { estimates, estimateVersions, workshops } from '../../db/schema'
import type { Database } from '../../db/client'
import type { Env } from '../../env'
import { auditContextOf, recordAudit } from '../../lib/audit'
import { ConflictError, NotFoundError, ValidationError, type ErrorIssue } from '../../lib/errors'
import { escapeHtml } from '../../lib/email-layout'
import { publishLive } from '../../lib/live-publish'
import type { EmailOutbox } from '../email/outbox'
import type { LabourService } from '../catalogue/labour.service'
import type { PricingRepo } from '../catalogue/pricing.repo'
import { estimateLinkUrl, issueEstimateLink, linkExpiry, revokeEstimateLinks } from '../portal/estimate-links'
import { type EstimatesRepo, type Queryable, type Tx } from './estimates.repo'
import { buildSnapshot, snapshotHash } from './estimate-snapshot'
import type { StaffPrincipal } from '../../../shared/schemas/auth'
import type { Page } from '../../../shared/schemas/common'
import type { Decision, EstimateResult } from '../../../shared/estimate/contract'
import {
  DEFAULT_ESTIMATE_DEFAULTS,
  EstimateDefaultsSchema,
  draftToEngineInput,
  estimateReference,
  snapshotToEngineInput,
  type AddFindings,
  type CreateEstimate,
  type DraftItem,
  type DraftLine,
  type EstimateDefaults,
  type EstimateDetail,
  type EstimateDraft,
  type EstimateListQuery,
  type EstimateSnapshot,
  type EstimateSummary,
  type SaveDraft,
  type SendEstimate,
} from '../../../shared/schemas/estimates'
import { positionLabels } from '../../../shared/schemas/inspections'
import { calculateEstimate, safeCalculateEstimate } from '../../../shared/estimate'
import { formatMoney } from '../../../shared/money'
import { sellPrice } from '../../../shared/catalogue/pricing'
import { normalizeDecimal } from '../../../shared/catalogue/decimal'

type Row = NonNullable<Awaited<ReturnType<EstimatesRepo['find']>>>
type FindingRow = Awaited<ReturnType<EstimatesRepo['jobFindings']>>[number]

/** Letters that sided operation codes end in, by the finding's position (common practice in our demo table: -L/-R, -F/-R). */
const sideSuffix: Record<string, string | null> = { left: 'L', right: 'R', front: 'F', rear: 'R', none: null }

export interface EstimatesServiceDeps {
  repo: EstimatesRepo
  labour: LabourService
  pricing: PricingRepo
  outbox: EmailOutbox
  env: Pick<Env, 'PUBLIC_BASE_URL'>
  logger: Logger
}

export function createEstimatesService(deps: EstimatesServiceDeps) {
  const { repo, labour, pricing, outbox, env } = deps
  const db: Database = repo.db

  /** Dates are the workshop's calendar days. */
  async function today(q: Queryable, timezone: string): Promise<string> {
    const r = await q.execute<{ d: string }>(sql`select to_char((now() at time zone ${timezone})::date, 'YYYY-MM-DD') as d`)
    return r.rows[0]?.d ?? new Date().toISOString().slice(0, 10)
  }

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

  function mustExist(row: Row | undefined): Row {
    if (!row) throw new NotFoundError('No such estimate in this workshop.')
    return row
  }

  function refuseWithdrawn(row: Row) {
    if (row.estimate.withdrawnAt) throw new ConflictError('This estimate was withdrawn; start a new one for the job.', 'withdrawn')
  }

  function refuseStale(row: Row, revision: number) {
    if (row.estimate.revision !== revision) {
      throw new ConflictError('Someone else changed this estimate since you opened it. Reload to see their changes.', 'stale_revision')
    }
  }

  // -------------------------------------------------------------------------------------------
  // Items from findings

  async function itemsFromFindings(
    q: Queryable,
    workshopId: string,
    draft: EstimateDraft,
    rows: FindingRow[],
  ): Promise<{ items: DraftItem[]; accessSteps: EstimateDraft['accessSteps']; notices: string[] }> {
    const price = await pricing.get(workshopId)
    const notices: string[] = []
    const wanted = new Set<string>()
    for (const f of rows) {
      const suffix = sideSuffix[f.position]
      for (const code of f.suggestedRepair.labour) {
        wanted.add(code)
        if (suffix) wanted.add(`${code}-${suffix}`)
      }
    }
    const operations = new Map((await labour.byCodes(workshopId, [...wanted])).map((o) => [o.code, o]))
    const partCodes = [...new Set(rows.flatMap((f) => f.suggestedRepair.parts))]
    const partRows = await repo.partsForCodes(q, workshopId, partCodes)
    const allSteps = operations.size > 0 ? await labour.listSteps(workshopId) : []
    const stepByCode = new Map(allSteps.map((s) => [s.code, s]))
    const accessSteps = [...draft.accessSteps]
    const known = new Set(accessSteps.map((s) => s.code))
    const addStep = (code: string) => {
      if (known.has(code)) return
      const s = stepByCode.get(code)
      if (!s) return
      known.add(code)
      accessSteps.push({ code: s.code, hours: s.hours, includes: s.includes, label: s.name })
      for (const inner of s.includes) addStep(inner)
    }

    const items = rows.map((f): DraftItem => {
      const suffix = sideSuffix[f.position]
      const lines: DraftLine[] = []
      for (const code of f.suggestedRepair.labour) {
        const op = operations.get(code) ?? (suffix ? operations.get(`${code}-${suffix}`) : undefined)
        if (!op) {
          notices.push(`"${f.title}": the suggested labour ${code} is not in your labour-time table; add the labour by hand.`)
          continue
        }
        if (op.rateMinor === null)
          notices.push(
            `"${f.title}": no hourly rate is set for ${op.category} labour, so ${op.code} is priced at 0 until the owner sets it.`,
          )
        for (const s of op.accessSteps) addStep(s.code)
        lines.push({
          id: randomUUID(),
          kind: 'labour',
          description: op.name,
          hours: op.bookHours,
          rate: op.rateMinor ?? 0,
          taxRate: price.defaultTaxRate,
          accessSteps: op.accessSteps.map((s) => s.code),
          operationCode: op.code,
          category: op.category,
        })
      }
      for (const code of f.suggestedRepair.parts) {
        const exact = partRows.find((p) => p.partNumber === code)
        const variants = partRows.filter((p) => p.partNumber.startsWith(`${code}-`))
        const part = exact ?? variants[0]
        if (!part) {
          notices.push(`"${f.title}": the suggested part ${code} is not in your parts list; add the part by hand.`)
          continue
        }
        // Parts carry no vehicle group, so when several variants match the first is only a guess.
        if (!exact && variants.length > 1) {
          notices.push(
            `"${f.title}": ${variants.length} parts match ${code} (${variants.map((v) => v.partNumber).join(', ')}); ${part.partNumber} was added — check it is the right one for this vehicle.`,
          )
        }
        const sell = sellPrice(part, price.markupBands, price.currency)
        if (!sell) notices.push(`"${f.title}": ${part.partNumber} has no price (no markup band covers its cost), so it is priced at 0.`)
        lines.push({
          id: randomUUID(),
          kind: 'part',
          description: part.description,
          quantity: '1',
          unitPrice: sell?.amountMinor ?? 0,
          taxRate: normalizeDecimal(part.taxRate),
          partNumber: part.partNumber,
        })
      }
      const side = positionLabels[f.position]
      return {
        id: randomUUID(),
        findingId: f.id,
        // "Swivel seal leaking — left", unless the finding's own words already say which side.
        title: side && !f.title.toLowerCase().includes(side.toLowerCase()) ? `${f.title} — ${side.toLowerCase()}` : f.title,
        severity: f.severity,
        customerNote: '',
        requires: [],
        lines,
      }
    })
    return { items, accessSteps, notices }
  }

  // -------------------------------------------------------------------------------------------
  // Reading

  async function detail(q: Queryable, row: Row, notices: string[] = []): Promise<EstimateDetail & { notices: string[] }> {
    const workshopId = row.estimate.workshopId
    const [versions, emails, findingRows, status] = await Promise.all([
      repo.versions(q, workshopId, row.estimate.id),
      repo.emails(q, workshopId, row.estimate.id),
      repo.jobFindings(q, workshopId, row.estimate.jobId),
      repo.status(q, workshopId, row.estimate.id),
    ])
    const latest = versions.at(-1)
    const decisions = latest ? await repo.decisions(q, workshopId, latest.version.id) : []
    let decided: EstimateResult | null = null
    if (latest) {
      const chosen: Record<string, Decision> =
        latest.confirmation?.decisions ?? Object.fromEntries(decisions.map((d) => [d.itemId, d.decision]))
      decided = latest.confirmation?.result ?? calculateEstimate(snapshotToEngineInput(latest.version.snapshot, chosen))
    }
    const usedBy = new Map<string, string[]>()
    for (const item of row.estimate.draft.items)
      if (item.findingId) usedBy.set(item.findingId, [...(usedBy.get(item.findingId) ?? []), item.id])
    const iso = (d: Date | null) => (d ? d.toISOString() : null)
    return {
      id: row.estimate.id,
      number: row.estimate.number,
      reference: estimateReference(row.estimate.number),
      status: status ?? 'draft',
      currency: row.workshop.currency,
      job: { id: row.job.id, concern: row.job.concern, vehicleGroup: row.vehicle.vehicleGroup },
      customer: { id: row.customer.id, name: row.customer.name, email: row.customer.email },
      vehicle: { id: row.vehicle.id, registration: row.vehicle.registration, make: row.vehicle.make, model: row.vehicle.model },
      draft: row.estimate.draft,
      revision: row.estimate.revision,
      hasUnsentChanges: row.estimate.withdrawnAt === null && row.estimate.sentRevision !== row.estimate.revision,
      versions: versions.map((v) => ({
        id: v.version.id,
        version: v.version.version,
        hash: v.version.hash,
        sentAt: v.version.sentAt.toISOString(),
        expiresOn: v.version.expiresOn,
        supersededAt: iso(v.version.supersededAt),
        openedAt: iso(v.version.openedAt),
        confirmedAt: iso(v.version.confirmedAt),
        proposedGross: v.version.proposedGross,
      })),
      decisions: decisions.map((d) => ({ itemId: d.itemId, decision: d.decision, decidedAt: d.decidedAt.toISOString() })),
      decided,
      emails: emails.map((m) => ({
        id: m.id,
        kind: m.kind,
        to: m.to,
        subject: m.subject,
        status: m.status,
        attempts: m.attempts,
        lastError: m.lastError,
        queuedAt: m.queuedAt.toISOString(),
        sentAt: iso(m.sentAt),
      })),
      findings: findingRows
        .filter((f) => f.severity !== 'ok')
        .map((f) => ({
          id: f.id,
          title: f.title,
          severity: f.severity,
          position: f.position,
          measurement: f.measurement,
          usedByItemIds: usedBy.get(f.id) ?? [],
        })),
      withdrawnAt: iso(row.estimate.withdrawnAt),
      createdAt: row.estimate.createdAt.toISOString(),
      updatedAt: row.estimate.updatedAt.toISOString(),
      notices,
    }
  }

  async function load(q: Queryable, workshopId: string, id: string, lock = false): Promise<Row> {
    return mustExist(await repo.find(q, workshopId, id, lock))
  }

  async function saveDraftRow(tx: Tx, row: Row, draft: EstimateDraft): Promise<Row> {
    const [saved] = await tx
      .update(estimates)
      .set({ draft, revision: row.estimate.revision + 1 })
      .where(and(eq(estimates.workshopId, row.estimate.workshopId), eq(estimates.id, row.estimate.id)))
      .returning()
    if (!saved) throw new NotFoundError('No such estimate in this workshop.')
    await publishLive(tx, { type: 'estimate.changed', workshopId: row.estimate.workshopId, estimateId: row.estimate.id })
    return { ...row, estimate: saved }
  }

  // -------------------------------------------------------------------------------------------
  // The e-mail that carries the link

  function sentEmail(snapshot: EstimateSnapshot, link: string, proposedGross: number, supersedes: boolean) {
    const money = formatMoney(proposedGross, snapshot.currency)
    const ref = `${snapshot.reference}${snapshot.version > 1 ? ` (version ${snapshot.version})` : ''}`
    const shop = snapshot.workshop.name
    const vehicle = `${snapshot.vehicle.make} ${snapshot.vehicle.model} (${snapshot.vehicle.registration})`
    const updated = supersedes
      ? 'We have updated the estimate we sent earlier; this one replaces it, so please decide on each item again.'
      : ''
    const text = [
      `Dear ${snapshot.customer.name},`,
      '',
      `${shop} has prepared estimate ${ref} for your ${vehicle}.`,
      updated,
      `It has ${snapshot.items.length} item${snapshot.items.length === 1 ? '' : 's'}; everything together comes to ${money}. You can approve or decline each item on its own.`,
      '',
      `Open the estimate: ${link}`,
      '',
      `The link works until the end of ${snapshot.expiresOn} and opens this estimate only. Questions? Reply to this e-mail or ask on an item.`,
      '',
      shop,
      [...snapshot.workshop.addressLines, snapshot.workshop.postcode].filter(Boolean).join(', '),
      snapshot.workshop.phone ?? '',
    ]
      .filter((l) => l !== null)
      .join('\n')
    const html = `<!doctype html><html><body style="font-family:Lato,Arial,sans-serif;color:#1b1b1b;max-width:560px">
<p>Dear ${escapeHtml(snapshot.customer.name)},</p>
<p>${escapeHtml(shop)} has prepared estimate <strong>${escapeHtml(ref)}</strong> for your ${escapeHtml(vehicle)}.</p>
${updated ? `<p>${escapeHtml(updated)}</p>` : ''}
<p>It has ${snapshot.items.length} item${snapshot.items.length === 1 ? '' : 's'}; everything together comes to <strong>${escapeHtml(money)}</strong>. You can approve or decline each item on its own.</p>
<p><a href="${escapeHtml(link)}" style="display:inline-block;background:#1F3A4D;color:#ffffff;padding:12px 20px;border-radius:6px;text-decoration:none">Open the estimate</a></p>
<p style="font-size:14px;color:#444">The link works until the end of ${escapeHtml(snapshot.expiresOn)} and opens this estimate only. Questions? Reply to this e-mail or ask on an item.</p>
<p style="font-size:14px;color:#444">${escapeHtml(shop)}<br>${escapeHtml([...snapshot.workshop.addressLines, snapshot.workshop.postcode].filter(Boolean).join(', '))}<br>${escapeHtml(snapshot.workshop.phone ?? '')}</p>
</body></html>`
    return { subject: `Estimate ${ref} from ${shop}`, text, html }
  }

  // -------------------------------------------------------------------------------------------

  return {
    async list(workshopId: string, q: EstimateListQuery): Promise<Page<EstimateSummary>> {
      const { rows, total } = await repo.list(workshopId, q)
      return {
        items: rows.map((r) => {
          let proposed = r.proposed_gross
          if (proposed === null) {
            const result = safeCalculateEstimate(draftToEngineInput(r.draft as EstimateDraft, r.currency))
            proposed = result.success ? result.data.proposed.gross : 0
          }
          return {
            id: r.id,
            number: r.number,
            reference: estimateReference(r.number),
            status: r.status,
            jobId: r.job_id,
            customerName: r.customer_name,
            registration: r.registration,
            currency: r.currency,
            proposedGross: proposed,
            approvedGross: r.approved_gross,
            depositMinor: r.deposit_minor,
            hasUnsentChanges: r.has_unsent_changes,
            latestVersion: r.latest_version,
            updatedAt: new Date(r.updated_at).toISOString(),
          }
        }),
        total,
        page: q.page,
        pageSize: q.pageSize,
      }
    },

    async get(workshopId: string, id: string) {
      return detail(db, await load(db, workshopId, id))
    },

    async create(req: Request, me: StaffPrincipal, input: CreateEstimate) {
      const workshopId = me.workshop.id
      const made = await db.transaction(async (tx) => {
        const job = await repo.findJob(tx, workshopId, input.jobId)
        if (!job) throw new NotFoundError('No such job in this workshop.')
        // One open estimate per job: revisions are versions of it, not new estimates.
        await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${`estimate-job:${input.jobId}`}, 0))`)
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
          expiresOn: addDays(await today(tx, job.workshop.timezone), defaults.expiryDays),
          message: '',
        }
        let notices: string[] = []
        if (input.findingIds.length > 0) {
          const rows = await repo.findingsByIds(tx, workshopId, input.findingIds)
          const strays = input.findingIds.filter((fid) => !rows.some((r) => r.id === fid && r.jobId === input.jobId))
          if (strays.length > 0)
            throw new ValidationError(
              'Some findings are not from this job.',
              strays.map(() => ({ path: ['findingIds'], message: 'Not a finding of this job' })),
            )
          const built = await itemsFromFindings(
            tx,
            workshopId,
            draft,
            input.findingIds.map((fid) => rows.find((r) => r.id === fid) as FindingRow),
          )
          draft = { ...draft, items: built.items, accessSteps: built.accessSteps }
          notices = built.notices
        }
        const number = await repo.nextNumber(tx, workshopId)
        const [estimate] = await tx
          .insert(estimates)
          .values({ workshopId, jobId: input.jobId, number, draft, createdBy: me.id })
          .returning()
        if (!estimate) throw new Error('estimate insert returned nothing')
        await repo.setJobStatus(tx, workshopId, job.job.id, ['booked_in', 'inspecting'], 'quoting')
        await recordAudit(tx, auditContextOf(req), {
          action: 'estimate.created',
          workshopId,
          subject: { type: 'estimate', id: estimate.id },
          details: { reference: estimateReference(number) },
        })
        await publishLive(tx, { type: 'estimate.changed', workshopId, estimateId: estimate.id, status: 'draft' })
        return { id: estimate.id, notices }
      })
      return detail(db, await load(db, workshopId, made.id), made.notices)
    },

    async saveDraft(req: Request, me: StaffPrincipal, id: string, input: SaveDraft) {
      const workshopId = me.workshop.id
      const saved = await db.transaction(async (tx) => {
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

    async addFindings(req: Request, me: StaffPrincipal, id: string, input: AddFindings) {
      const workshopId = me.workshop.id
      const result = await db.transaction(async (tx) => {
        const row = await load(tx, workshopId, id, true)
        refuseWithdrawn(row)
        refuseStale(row, input.revision)
        const rows = await repo.findingsByIds(tx, workshopId, input.findingIds)
        const ordered = input.findingIds.map((fid) => rows.find((r) => r.id === fid && r.jobId === row.estimate.jobId))
        if (ordered.some((r) => !r))
          throw new ValidationError('Some findings are not from this job.', [
            { path: ['findingIds'], message: 'Not a finding of this job' },
          ])
        const built = await itemsFromFindings(tx, workshopId, row.estimate.draft, ordered as FindingRow[])
        const draft = { ...row.estimate.draft, items: [...row.estimate.draft.items, ...built.items], accessSteps: built.accessSteps }
        if (draft.items.length > 200)
          throw new ValidationError('An estimate holds at most 200 items.', [{ path: ['findingIds'], message: 'Too many items' }])
        return { row: await saveDraftRow(tx, row, draft), notices: built.notices }
      })
      return detail(db, result.row, result.notices)
    },

    async send(req: Request, me: StaffPrincipal, id: string, input: SendEstimate) {
      const workshopId = me.workshop.id
      const sentId = await db.transaction(async (tx) => {
        const row = await load(tx, workshopId, id, true)
        refuseWithdrawn(row)
        refuseStale(row, input.revision)
        const { draft } = row.estimate
        const problems: ErrorIssue[] = []
        if (draft.items.length === 0) problems.push({ path: ['draft', 'items'], message: 'Add at least one item before sending.' })
        if (!row.customer.email)
          problems.push({
            path: ['customer', 'email'],
            message: `${row.customer.name} has no e-mail address; add one to the customer first.`,
          })
        const day = await today(tx, row.workshop.timezone)
        if (draft.expiresOn < day)
          problems.push({ path: ['draft', 'expiresOn'], message: 'The expiry date has passed; choose a later date.' })
        problems.push(...engineIssues(draft, row.workshop.currency))
        if (problems.length > 0) throw new ValidationError('The estimate cannot be sent yet.', problems)
        if (row.estimate.sentRevision === row.estimate.revision)
          throw new ConflictError('This version has already been sent; change something first or send the e-mail again.', 'already_sent')

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
        const [saved] = await tx
          .insert(estimateVersions)
          .values({
            workshopId,
            estimateId: id,
            version,
            snapshot,
            hash,
            proposedGross: result.proposed.gross,
            expiresOn: draft.expiresOn,
            sentBy: me.id,
          })
          .returning()
        if (!saved) throw new Error('version insert returned nothing')
        if (previous) {
          await tx
            .update(estimateVersions)
            .set({ supersededAt: sql`now()` })
            .where(and(eq(estimateVersions.workshopId, workshopId), eq(estimateVersions.id, previous.version.id)))
        }
        await revokeEstimateLinks(tx, workshopId, id, saved.id)
        const expiresAt = await linkExpiry(tx, workshopId, saved.id)
        const token = await issueEstimateLink(tx, { workshopId, versionId: saved.id, customerId: row.customer.id, expiresAt })
        await tx
          .update(estimates)
          .set({ sentRevision: row.estimate.revision })
          .where(and(eq(estimates.workshopId, workshopId), eq(estimates.id, id)))
        await repo.setJobStatus(
          tx,
          workshopId,
          row.estimate.jobId,
          ['booked_in', 'inspecting', 'quoting', 'waiting_for_customer', 'in_work'],
          'waiting_for_customer',
        )
        const mail = sentEmail(snapshot, estimateLinkUrl(env.PUBLIC_BASE_URL, token), result.proposed.gross, Boolean(previous))
        await outbox.queue(
          {
            workshopId,
            estimateId: id,
            kind: 'estimate.sent',
            to: row.customer.email as string,
            subject: mail.subject,
            text: mail.text,
            html: mail.html,
            replyTo: row.workshop.email,
            fromName: row.workshop.name,
          },
          tx,
        )
        await recordAudit(tx, auditContextOf(req), {
          action: 'estimate.sent',
          workshopId,
          subject: { type: 'estimate', id },
          details: { reference: snapshot.reference, version, hash, proposedGross: result.proposed.gross, to: row.customer.email },
        })
        await publishLive(tx, {
          type: 'estimate.sent',
          workshopId,
          estimateId: id,
          status: 'sent',
          summary: `${snapshot.reference} version ${version} sent to ${row.customer.name}`,
        })
        return id
      })
      return detail(db, await load(db, workshopId, sentId))
    },

    async withdraw(req: Request, me: StaffPrincipal, id: string) {
      const workshopId = me.workshop.id
      await db.transaction(async (tx) => {
        const row = await load(tx, workshopId, id, true)
        refuseWithdrawn(row)
        await tx
          .update(estimates)
          .set({ withdrawnAt: sql`now()` })
          .where(and(eq(estimates.workshopId, workshopId), eq(estimates.id, id)))
        await revokeEstimateLinks(tx, workshopId, id)
        await recordAudit(tx, auditContextOf(req), {
          action: 'estimate.withdrawn',
          workshopId,
          subject: { type: 'estimate', id },
          details: { reference: estimateReference(row.estimate.number) },
        })
        await publishLive(tx, { type: 'estimate.withdrawn', workshopId, estimateId: id, status: 'withdrawn' })
      })
      return detail(db, await load(db, workshopId, id))
    },

    async resendEmail(req: Request, me: StaffPrincipal, id: string, emailId: string) {
      const workshopId = me.workshop.id
      const row = await load(db, workshopId, id)
      const emails = await repo.emails(db, workshopId, row.estimate.id)
      if (!emails.some((m) => m.id === emailId)) throw new NotFoundError('No such e-mail for this estimate.')
      await outbox.resend(workshopId, emailId)
      await recordAudit(db, auditContextOf(req), {
        action: 'estimate.email_resent',
        workshopId,
        subject: { type: 'estimate', id },
        details: { emailId },
      })
    },

    /** The version's snapshot and figures, for the PDF. */
    async versionForPdf(workshopId: string, id: string, version: number) {
      const row = await load(db, workshopId, id)
      const versions = await repo.versions(db, workshopId, id)
      const v = versions.find((x) => x.version.version === version)
      if (!v) throw new NotFoundError('No such version of this estimate.')
      return { row, ...v }
    },

    async getDefaults(workshopId: string): Promise<EstimateDefaults> {
      const [w] = await db.select({ d: workshops.estimateDefaults }).from(workshops).where(eq(workshops.id, workshopId))
      return defaultsOf(w?.d)
    },

    async saveDefaults(req: Request, me: StaffPrincipal, input: EstimateDefaults): Promise<EstimateDefaults> {
      const before = await this.getDefaults(me.workshop.id)
      await db.update(workshops).set({ estimateDefaults: input }).where(eq(workshops.id, me.workshop.id))
      await recordAudit(db, auditContextOf(req), {
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
