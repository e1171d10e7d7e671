import type { Request } from 'express'
import { and, eq } from 'drizzle-orm'
import type { Logger } from 'pino'
import { estimates } from '../../db/schema'
import type { Env } from '../../env'
import { auditContextOf, recordAudit } from '../../lib/audit'
import { AppError, type ErrorIssue, NotFoundError, ValidationError } from '../../lib/errors'
import { publishLive } from '../../lib/live-publish'
import type { FileStorage } from '../../lib/storage'
import type { EmailOutbox } from '../email/outbox'
import { hashToken } from '../../lib/tokens'
import { estimateLinkUrl, issueEstimateLink } from './estimate-links'
import { cancellationInfo } from './cancellation'
import { answerEmail, confirmationCopyEmail, confirmationEmail, itemWords, questionEmail, renewedLinkEmail } from './portal.emails'
import type { PortalRepo, Tx, VersionRow } from './portal.repo'
import { safeCalculateEstimate } from '../../../shared/estimate'
import { formatMoney } from '../../../shared/money'
import type { CustomerPrincipal, Principal, StaffPrincipal } from '../../../shared/schemas/auth'
import type { Decision, EstimateResult } from '../../../shared/estimate/contract'
import { sentEstimateStatusOf, snapshotToEngineInput, type EstimateSnapshot, type SnapshotItem } from '../../../shared/schemas/estimates'
import type {
  AnswerQuestion,
  AskQuestion,
  ConfirmEstimate,
  ConfirmResponse,
  DecisionResponse,
  LinkRefusalDetails,
  PortalConfirmation,
  PortalDeposit,
  PortalEstimate,
  PortalEstimateStatus,
  PortalEstimateSummary,
  PortalQuestion,
  PutDecision,
  StaffQuestion,
  SupersededDetails,
} from '../../../shared/schemas/portal'

/** A refusal the portal page acts on: the error body carries `details` beside the code. */
export class PortalRefusal extends AppError {
  constructor(
    status: number,
    code: string,
    message: string,
    override readonly details: LinkRefusalDetails | SupersededDetails | Record<string, unknown>,
    issues?: ErrorIssue[],
  ) {
    super(status, code, message, issues)
  }
}

/** What the portal needs of the deposits module (server/modules/payments/deposits.service.ts). */
export interface DepositCheckout {
  startCheckout(
    confirmationId: string,
    urls: { successUrl: string; cancelUrl: string; req?: Request | null },
  ): Promise<{ url: string; sessionId: string }>
}

export interface PortalServiceDeps {
  repo: PortalRepo
  outbox: EmailOutbox
  deposits: DepositCheckout
  storage: FileStorage
  env: Pick<Env, 'PUBLIC_BASE_URL'>
  logger: Logger
  /** The principal a session is started for; the auth module's loader, so a link signs in exactly as a sign-in link does. */
  loadCustomer: (id: string) => Promise<Principal | undefined>
}

type Confirmed = NonNullable<Awaited<ReturnType<PortalRepo['confirmation']>>>

const notYours = () => new NotFoundError('No such estimate.')
const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null)

const RENEW_ANSWER =
  'If that link belongs to an estimate that can still be decided on, a fresh link is on its way to the e-mail address the workshop has for you.'

export function createPortalService(deps: PortalServiceDeps) {
  const { repo, outbox, deposits, storage, env, logger } = deps
  const db = repo.db
  const base = env.PUBLIC_BASE_URL.replace(/\/$/, '')
  const staffEstimateUrl = (estimateId: string) => `${base}/estimates/${estimateId}`
  const portalEstimateUrl = (estimateId: string) => `${base}/portal/estimates/${estimateId}`

  /** The estimate's versions when its latest one was addressed to this customer; anyone else's is simply not there. */
  async function ownVersions(me: CustomerPrincipal, estimateId: string) {
    const [estimate, versions] = await Promise.all([
      repo.estimate(db, me.workshop.id, estimateId),
      repo.versions(db, me.workshop.id, estimateId),
    ])
    const latest = versions.at(-1)
    if (!estimate || !latest || latest.snapshot.customer.id !== me.id) throw notYours()
    return { estimate, versions, latest }
  }

  /** Inside a transaction: the same ownership check, then the estimate row shared-locked so it cannot be sent again or withdrawn until we commit. */
  async function lockOwn(tx: Tx, me: CustomerPrincipal, estimateId: string, versionNumber: number) {
    const [estimate] = await tx
      .select({ id: estimates.id, jobId: estimates.jobId, withdrawnAt: estimates.withdrawnAt })
      .from(estimates)
      .where(and(eq(estimates.workshopId, me.workshop.id), eq(estimates.id, estimateId)))
      .for('share')
    const latestNumber = await repo.latestVersionNumber(tx, me.workshop.id, estimateId)
    if (!estimate || latestNumber === undefined) throw notYours()
    const latest = await repo.lockVersion(tx, me.workshop.id, estimateId, latestNumber)
    if (!latest || latest.snapshot.customer.id !== me.id) throw notYours()
    const version = versionNumber === latestNumber ? latest : await repo.lockVersion(tx, me.workshop.id, estimateId, versionNumber)
    if (!version || version.snapshot.customer.id !== me.id) throw new NotFoundError('No such version of this estimate.', 'no_such_version')
    return { estimate, latest, version }
  }

  function superseded(latestVersion: number) {
    return new PortalRefusal(
      409,
      'superseded',
      `The workshop has sent a newer version (version ${latestVersion}) of this estimate. Please look at that one.`,
      { latestVersion } satisfies SupersededDetails,
    )
  }

  function refuseClosed(estimate: { withdrawnAt: Date | null }, version: VersionRow, latest: VersionRow) {
    if (estimate.withdrawnAt)
      throw new AppError(
        410,
        'withdrawn',
        'The workshop has withdrawn this estimate, so it can no longer be decided on. Please contact them.',
      )
    if (version.supersededAt || version.version !== latest.version) throw superseded(latest.version)
    if (version.expired)
      throw new AppError(
        410,
        'expired',
        `This estimate could be decided on until the end of ${version.expiresOn}. Please contact the workshop for a new one.`,
      )
  }

  function decisionsOf(snapshot: EstimateSnapshot, stored: Record<string, Decision>): Record<string, Decision> {
    return Object.fromEntries(snapshot.items.map((i) => [i.id, stored[i.id] ?? 'pending']))
  }

  /** The engine's figures; stored choices that the rules no longer allow are shown as not yet decided rather than failing the page. */
  function figures(snapshot: EstimateSnapshot, decisions: Record<string, Decision>): EstimateResult {
    const decided = safeCalculateEstimate(snapshotToEngineInput(snapshot, decisions))
    if (decided.success) return decided.data
    const proposed = safeCalculateEstimate(snapshotToEngineInput(snapshot))
    if (!proposed.success) throw new Error(`sent version cannot be priced: ${proposed.issues[0]?.message ?? 'unknown'}`)
    return proposed.data
  }

  function statusOf(
    estimate: { withdrawnAt: Date | null },
    v: Pick<VersionRow, 'confirmedAt' | 'expired' | 'openedAt'>,
    depositStatus: 'awaiting_payment' | 'paid' | 'refunded' | null | undefined,
  ): PortalEstimateStatus {
    return sentEstimateStatusOf({
      withdrawn: estimate.withdrawnAt !== null,
      depositStatus: depositStatus ?? null,
      confirmed: v.confirmedAt !== null,
      expired: v.expired,
      opened: v.openedAt !== null,
    })
  }

  function depositOf(confirmed: Confirmed | undefined, currency: string): PortalDeposit {
    if (!confirmed || confirmed.confirmation.depositMinor === 0)
      return { status: 'not_due', amountMinor: 0, currency, paidAt: null, refundedMinor: null, refundedAt: null }
    const d = confirmed.deposit
    return {
      status: d?.status ?? 'awaiting_payment',
      amountMinor: d?.amountMinor ?? confirmed.confirmation.depositMinor,
      currency: d?.currency ?? currency,
      paidAt: iso(d?.paidAt),
      refundedMinor: d?.refundedMinor ?? null,
      refundedAt: iso(d?.refundedAt),
    }
  }

  function confirmationOf(c: Confirmed['confirmation']): PortalConfirmation {
    return {
      id: c.id,
      confirmedAt: c.confirmedAt.toISOString(),
      versionHash: c.versionHash,
      decisions: c.decisions,
      consents: c.consents,
      approvedGross: c.approvedGross,
      depositMinor: c.depositMinor,
    }
  }

  function itemOf(snapshot: EstimateSnapshot, itemId: string): SnapshotItem {
    const item = snapshot.items.find((i) => i.id === itemId)
    if (!item) throw new NotFoundError('No such item on this estimate.', 'no_such_item')
    return item
  }

  const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1)
  const listWords = (words: string[]) =>
    words.length <= 1 ? (words[0] ?? '') : `${words.slice(0, -1).join(', ')} and ${words.at(-1) ?? ''}`

  /**
   * An approved item needs every item it `requires` approved too (the engine refuses anything
   * else). Rather than change another item behind the customer's back, a choice that would break
   * that is refused with words naming the other item, and the customer makes both choices.
   */
  function refuseBrokenRequirement(snapshot: EstimateSnapshot, item: SnapshotItem, next: Record<string, Decision>) {
    if (next[item.id] === 'approved') {
      const missing = item.requires.flatMap((id) => snapshot.items.filter((i) => i.id === id && next[i.id] !== 'approved'))
      if (missing.length > 0) {
        const names = listWords(missing.map(itemWords))
        throw new ValidationError(
          `${capitalise(itemWords(item))} can only be done together with ${names}. Approve ${missing.length === 1 ? 'that item' : 'those items'} first, or decline this one.`,
          missing.map((m) => ({ path: ['decisions', m.id], message: `${capitalise(itemWords(item))} needs ${itemWords(m)}` })),
          'requires',
        )
      }
      return
    }
    const dependants = snapshot.items.filter((i) => i.requires.includes(item.id) && next[i.id] === 'approved')
    if (dependants.length > 0) {
      const names = listWords(dependants.map(itemWords))
      throw new ValidationError(
        `You approved ${names}, which can only be done together with this item. Decline ${dependants.length === 1 ? 'that item' : 'those items'} first, or keep this one approved.`,
        dependants.map((d) => ({ path: ['decisions', d.id], message: `${capitalise(itemWords(d))} needs ${itemWords(item)}` })),
        'requires',
      )
    }
  }

  function questionOf(row: Awaited<ReturnType<PortalRepo['questions']>>[number]): PortalQuestion {
    const q = row.question
    return {
      id: q.id,
      itemId: q.itemId,
      version: row.version,
      question: q.question,
      answer: q.answer,
      askedAt: q.askedAt.toISOString(),
      answeredAt: iso(q.answeredAt),
    }
  }

  /** A fresh link to the version when it can still be decided on; null when there is nothing to open. */
  async function freshLink(
    tx: Tx,
    workshopId: string,
    estimate: { withdrawnAt: Date | null },
    version: VersionRow,
    customerId: string,
  ): Promise<string | null> {
    if (estimate.withdrawnAt || version.expired || version.supersededAt) return null
    const expiresAt = await repo.linkExpiry(tx, workshopId, version.id)
    const token = await issueEstimateLink(tx, { workshopId, versionId: version.id, customerId, expiresAt })
    return estimateLinkUrl(base, token)
  }

  return {
    /**
     * Checks a link and records that it was opened. Refusals a customer can act on answer 410
     * with what the page needs to offer a fresh link; the caller starts the session. The link lives
     * for days where a sign-in link lives 10 minutes because a customer decides over days and the
     * link opens only this estimate for this customer (README, "Estimate links").
     */
    async open(req: Request, token: string): Promise<{ principal: Principal; estimateId: string; version: number }> {
      const found = await repo.linkByHash(db, hashToken(token))
      if (!found)
        throw new AppError(
          400,
          'link_invalid',
          'We do not recognise this link. Please use the newest e-mail from the workshop, or ask them to send the estimate again.',
        )
      const { link, version, estimate } = found
      const versions = await repo.versions(db, link.workshopId, estimate.id)
      const latest = versions.at(-1) ?? version
      const newerVersion = latest.version > version.version
      const renewable = !estimate.withdrawnAt && !latest.expired && latest.snapshot.customer.id === link.customerId
      const refuse = (code: string, message: string, canRenew = renewable) =>
        new PortalRefusal(410, code, message, { newerVersion, renewable: canRenew } satisfies LinkRefusalDetails)
      if (estimate.withdrawnAt)
        throw refuse('link_revoked', 'The workshop has withdrawn this estimate. Please contact them if you have questions.', false)
      if (version.supersededAt || newerVersion)
        throw refuse('link_superseded', 'The workshop has sent a newer version of this estimate, so this link no longer opens it.')
      if (link.revokedAt) throw refuse('link_revoked', 'This link has been cancelled by the workshop.')
      if (link.expiresAt.getTime() <= Date.now() || version.expired)
        throw refuse('link_expired', `This link worked until the end of ${version.expiresOn}.`)
      const principal = await deps.loadCustomer(link.customerId)
      if (!principal || principal.kind !== 'customer' || principal.workshop.id !== link.workshopId) {
        throw refuse('link_revoked', 'This link can no longer be used. Please contact the workshop.', false)
      }
      const s = version.snapshot
      await repo.transaction(async (tx) => {
        await repo.touchLink(tx, link.id)
        const first = await repo.markOpened(tx, link.workshopId, version.id)
        await recordAudit(tx, auditContextOf(req), {
          action: 'estimate.opened',
          workshopId: link.workshopId,
          actor: { kind: 'customer', id: principal.id, name: principal.name },
          subject: { type: 'estimate', id: estimate.id },
          details: { reference: s.reference, version: version.version, firstOpening: first },
        })
        if (first) {
          await publishLive(tx, {
            type: 'estimate.opened',
            workshopId: link.workshopId,
            estimateId: estimate.id,
            ...(version.confirmedAt ? {} : { status: 'opened' as const }),
            summary: `${principal.name} opened ${s.reference}${version.version > 1 ? ` version ${version.version}` : ''}`,
          })
        }
      })
      return { principal, estimateId: estimate.id, version: version.version }
    },

    renewAnswer: RENEW_ANSWER,

    /**
     * Sends a fresh link for the latest live version to the customer's address on record. Says
     * nothing to the caller: every outcome, failures included, ends in the same answer.
     */
    async renew(req: Request, token: string): Promise<void> {
      try {
        const found = await repo.linkByHash(db, hashToken(token))
        if (!found) {
          logger.info('fresh estimate link asked for with a token we never issued')
          return
        }
        const { link, estimate } = found
        const sent = await repo.transaction(async (tx) => {
          const versions = await repo.versions(tx, link.workshopId, estimate.id)
          const latest = versions.at(-1)
          if (!latest || latest.snapshot.customer.id !== link.customerId) return null
          const customer = await repo.customer(tx, link.workshopId, link.customerId)
          if (!customer?.email || customer.archivedAt) return null
          const url = await freshLink(tx, link.workshopId, estimate, latest, customer.id)
          if (!url) return null
          const mail = renewedLinkEmail(latest.snapshot, customer.name, url)
          await outbox.queue(
            {
              workshopId: link.workshopId,
              estimateId: estimate.id,
              kind: 'estimate.link_renewed',
              to: customer.email,
              subject: mail.subject,
              text: mail.text,
              html: mail.html,
              replyTo: latest.snapshot.workshop.email,
              fromName: latest.snapshot.workshop.name,
            },
            tx,
          )
          await recordAudit(tx, auditContextOf(req), {
            action: 'estimate.link_renewed',
            workshopId: link.workshopId,
            actor: { kind: 'anonymous' },
            subject: { type: 'estimate', id: estimate.id },
            details: {
              reference: latest.snapshot.reference,
              version: latest.version,
              fromVersion: found.version.version,
              to: customer.email,
            },
          })
          return latest.version
        })
        if (sent === null)
          logger.info({ estimateId: estimate.id }, 'fresh estimate link not sent: nothing the customer can still decide on')
      } catch (err) {
        logger.error({ err }, 'fresh estimate link could not be sent')
      }
    },

    async list(me: CustomerPrincipal): Promise<PortalEstimateSummary[]> {
      const rows = await repo.listForCustomer(me.workshop.id, me.id)
      return rows.map((r) => ({
        id: r.id,
        reference: r.snapshot.reference,
        workshopName: r.snapshot.workshop.name,
        vehicle: { registration: r.snapshot.vehicle.registration, make: r.snapshot.vehicle.make, model: r.snapshot.vehicle.model },
        latestVersion: r.version,
        status: statusOf(
          { withdrawnAt: r.withdrawn_at ? new Date(r.withdrawn_at) : null },
          {
            confirmedAt: r.confirmed_at ? new Date(r.confirmed_at) : null,
            expired: r.expired,
            openedAt: r.opened_at ? new Date(r.opened_at) : null,
          },
          r.deposit_status,
        ),
        sentAt: new Date(r.sent_at).toISOString(),
        expiresOn: r.expires_on,
        currency: r.snapshot.currency,
        proposedGross: r.proposed_gross,
        approvedGross: r.approved_gross,
      }))
    },

    async get(me: CustomerPrincipal, estimateId: string, versionNumber?: number): Promise<PortalEstimate> {
      const { estimate, versions, latest } = await ownVersions(me, estimateId)
      const shown =
        versionNumber === undefined ? latest : versions.find((v) => v.version === versionNumber && v.snapshot.customer.id === me.id)
      if (!shown) throw new NotFoundError('No such version of this estimate.', 'no_such_version')
      const [stored, confirmed, questionRows] = await Promise.all([
        repo.decisions(db, me.workshop.id, shown.id),
        repo.confirmation(db, me.workshop.id, shown.id),
        repo.questions(db, me.workshop.id, estimateId, me.id),
      ])
      const decisions = confirmed ? decisionsOf(shown.snapshot, confirmed.confirmation.decisions) : decisionsOf(shown.snapshot, stored)
      const isSuperseded = shown.supersededAt !== null || shown.version !== latest.version
      return {
        id: estimateId,
        reference: shown.snapshot.reference,
        status: statusOf(estimate, shown, confirmed?.deposit?.status),
        version: shown.version,
        latestVersion: latest.version,
        superseded: isSuperseded,
        expired: shown.expired,
        withdrawn: estimate.withdrawnAt !== null,
        canDecide: !isSuperseded && !shown.expired && estimate.withdrawnAt === null && !confirmed,
        hash: shown.hash,
        sentAt: shown.sentAt.toISOString(),
        snapshot: shown.snapshot,
        decisions,
        // A confirmed version shows the figures stored with the confirmation: what the customer agreed to.
        result: confirmed?.confirmation.result ?? figures(shown.snapshot, decisions),
        confirmation: confirmed ? confirmationOf(confirmed.confirmation) : null,
        deposit: depositOf(confirmed, shown.snapshot.currency),
        questions: questionRows.map(questionOf),
        cancellation: cancellationInfo(shown.snapshot),
      }
    },

    /** One item's decision, made one at a time per version (the version row is locked), answered with the full figures after it. */
    async decide(req: Request, me: CustomerPrincipal, estimateId: string, itemId: string, input: PutDecision): Promise<DecisionResponse> {
      return repo.transaction(async (tx) => {
        const { estimate, latest, version } = await lockOwn(tx, me, estimateId, input.version)
        refuseClosed(estimate, version, latest)
        if (version.confirmedAt)
          throw new AppError(
            409,
            'confirmed',
            'You have already confirmed your decisions on this estimate. Please contact the workshop to change them.',
          )
        const s = version.snapshot
        const item = itemOf(s, itemId)
        const next = decisionsOf(s, { ...(await repo.decisions(tx, me.workshop.id, version.id)), [itemId]: input.decision })
        refuseBrokenRequirement(s, item, next)
        await repo.saveDecision(tx, { workshopId: me.workshop.id, versionId: version.id, itemId, decision: input.decision })
        const decided = safeCalculateEstimate(snapshotToEngineInput(s, next))
        if (!decided.success) {
          throw new ValidationError(
            'That choice cannot be priced. Please contact the workshop.',
            decided.issues.map((i) => ({ path: i.path.map(String), message: i.message })),
            'cannot_price',
          )
        }
        const result = decided.data
        await recordAudit(tx, auditContextOf(req), {
          action: 'estimate.decided',
          workshopId: me.workshop.id,
          subject: { type: 'estimate', id: estimateId },
          details: {
            reference: s.reference,
            version: version.version,
            item: `${item.number}: ${item.title}`,
            decision: input.decision,
            approvedGross: result.approved.gross,
          },
        })
        const verb = { approved: 'approved', declined: 'declined', pending: 'undid their choice on' }[input.decision]
        await publishLive(tx, {
          type: 'estimate.decision',
          workshopId: me.workshop.id,
          estimateId,
          summary: `${me.name} ${verb} item ${item.number}: ${item.title}`.slice(0, 300),
        })
        return { version: version.version, decisions: next, result }
      })
    },

    async confirm(
      req: Request,
      me: CustomerPrincipal,
      estimateId: string,
      input: ConfirmEstimate,
    ): Promise<{ created: boolean; answer: ConfirmResponse }> {
      const answerFor = (c: { id: string; depositMinor: number }): ConfirmResponse => ({
        confirmationId: c.id,
        depositDue: c.depositMinor,
        next: c.depositMinor > 0 ? 'pay' : 'done',
      })
      return repo.transaction(async (tx) => {
        const { estimate, latest, version } = await lockOwn(tx, me, estimateId, input.version)
        const hashMismatch = () =>
          new ValidationError(
            'The estimate on your screen is not the one the workshop sent. Please reload the page and check it again.',
            [{ path: ['hash'], message: 'Does not match the sent version' }],
            'hash_mismatch',
          )
        // Confirming twice (a retry, a second tab) answers with the record already made.
        const existing = await repo.confirmation(tx, me.workshop.id, version.id)
        if (existing) {
          if (existing.confirmation.versionHash !== input.hash) throw hashMismatch()
          return { created: false, answer: answerFor(existing.confirmation) }
        }
        refuseClosed(estimate, version, latest)
        if (input.hash !== version.hash) throw hashMismatch()
        const s = version.snapshot
        const stored = decisionsOf(s, await repo.decisions(tx, me.workshop.id, version.id))
        const open = s.items.filter((i) => stored[i.id] !== 'approved' && stored[i.id] !== 'declined')
        if (open.length > 0) {
          throw new ValidationError(
            `Please approve or decline every item first: ${listWords(open.map(itemWords))} ${open.length === 1 ? 'is' : 'are'} not decided yet.`,
            open.map((i) => ({ path: ['decisions', i.id], message: `${capitalise(itemWords(i))} is not decided yet` })),
            'undecided',
          )
        }
        const decided = safeCalculateEstimate(snapshotToEngineInput(s, stored))
        if (!decided.success) {
          throw new ValidationError(
            'Your choices cannot be confirmed together. Please check the items marked.',
            decided.issues.map((i) => ({ path: i.path.map(String), message: i.message })),
            'cannot_price',
          )
        }
        // The server's figures are the truth: the engine prices the stored decisions again here.
        const result = decided.data
        const decisions = Object.fromEntries(
          Object.entries(stored).map(([id, d]) => [id, d === 'approved' ? 'approved' : 'declined'] as const),
        )
        const anyApproved = Object.values(decisions).includes('approved')
        const confirmation = await repo.insertConfirmation(tx, {
          workshopId: me.workshop.id,
          versionId: version.id,
          customerId: me.id,
          versionHash: version.hash,
          decisions,
          consents: {
            startWithinCancellationPeriod: input.consents.startWithinCancellationPeriod,
            cancellationInformationShown: input.consents.cancellationInformationShown,
          },
          result,
          approvedGross: result.approved.gross,
          depositMinor: result.approved.deposit,
          ip: req.ip ?? null,
          userAgent: req.get('user-agent')?.slice(0, 400) ?? null,
        })
        await repo.markConfirmed(tx, me.workshop.id, version.id)
        // With a deposit due, work waits for the provider's word that it is paid (the deposits module moves the job on).
        if (anyApproved && result.approved.deposit === 0)
          await repo.setJobStatus(
            tx,
            me.workshop.id,
            estimate.jobId,
            ['booked_in', 'inspecting', 'quoting', 'waiting_for_customer'],
            'in_work',
          )
        const money = (minor: number) => formatMoney(minor, result.currency)
        await recordAudit(tx, auditContextOf(req), {
          action: 'estimate.confirmed',
          workshopId: me.workshop.id,
          subject: { type: 'estimate', id: estimateId },
          details: {
            reference: s.reference,
            version: version.version,
            hash: version.hash,
            approved: Object.values(decisions).filter((d) => d === 'approved').length,
            declined: Object.values(decisions).filter((d) => d === 'declined').length,
            approvedGross: result.approved.gross,
            depositMinor: result.approved.deposit,
            startWithinCancellationPeriod: input.consents.startWithinCancellationPeriod,
          },
        })
        await publishLive(tx, {
          type: 'estimate.confirmed',
          workshopId: me.workshop.id,
          estimateId,
          status: 'confirmed',
          summary: anyApproved
            ? `${me.name} confirmed ${s.reference}: ${money(result.approved.gross)} approved${result.approved.deposit > 0 ? `, deposit ${money(result.approved.deposit)} due` : ''}`
            : `${me.name} declined every item on ${s.reference}`,
        })
        const facts = {
          snapshot: s,
          result,
          customerName: me.name,
          confirmedAt: confirmation.confirmedAt,
          startWithinCancellationPeriod: input.consents.startWithinCancellationPeriod,
          estimateUrl: portalEstimateUrl(estimateId),
        }
        const toCustomer = confirmationEmail(facts)
        await outbox.queue(
          {
            workshopId: me.workshop.id,
            estimateId,
            kind: 'estimate.confirmed',
            to: me.email,
            subject: toCustomer.subject,
            text: toCustomer.text,
            html: toCustomer.html,
            replyTo: s.workshop.email,
            fromName: s.workshop.name,
            attachments: [{ type: 'estimate-pdf', versionId: version.id, filename: `${s.reference}-v${version.version}.pdf` }],
          },
          tx,
        )
        if (s.workshop.email) {
          const copy = confirmationCopyEmail(facts, staffEstimateUrl(estimateId))
          await outbox.queue(
            {
              workshopId: me.workshop.id,
              estimateId,
              kind: 'estimate.confirmed.copy',
              to: s.workshop.email,
              subject: copy.subject,
              text: copy.text,
              html: copy.html,
              replyTo: me.email,
            },
            tx,
          )
        }
        return { created: true, answer: answerFor(confirmation) }
      })
    },

    async deposit(me: CustomerPrincipal, estimateId: string): Promise<PortalDeposit> {
      const { latest } = await ownVersions(me, estimateId)
      return depositOf(await repo.confirmation(db, me.workshop.id, latest.id), latest.snapshot.currency)
    },

    async checkout(req: Request, me: CustomerPrincipal, estimateId: string): Promise<{ url: string }> {
      const { estimate, latest } = await ownVersions(me, estimateId)
      if (estimate.withdrawnAt)
        throw new AppError(410, 'withdrawn', 'The workshop has withdrawn this estimate; there is nothing to pay. Please contact them.')
      const confirmed = await repo.confirmation(db, me.workshop.id, latest.id)
      if (!confirmed) throw new AppError(409, 'not_confirmed', 'Please confirm your decisions before paying the deposit.')
      const state = depositOf(confirmed, latest.snapshot.currency)
      if (state.status === 'not_due') throw new AppError(409, 'no_deposit_due', 'No deposit is due on this estimate.')
      if (state.status !== 'awaiting_payment') throw new AppError(409, 'already_paid', 'The deposit has already been paid.')
      const { url } = await deposits.startCheckout(confirmed.confirmation.id, {
        successUrl: `${portalEstimateUrl(estimateId)}/paid?session_id={CHECKOUT_SESSION_ID}`,
        cancelUrl: portalEstimateUrl(estimateId),
        req,
      })
      return { url }
    },

    /** A photo of a finding on one of the customer's versions of this estimate, and no other. */
    async photo(me: CustomerPrincipal, estimateId: string, photoId: string, variant: 'full' | 'thumb') {
      const { versions } = await ownVersions(me, estimateId)
      const shown = versions
        .filter((v) => v.snapshot.customer.id === me.id)
        .some((v) => v.snapshot.items.some((i) => i.photoIds.includes(photoId)))
      if (!shown) throw new NotFoundError('No such photo on this estimate.')
      const row = await repo.photo(me.workshop.id, photoId)
      if (!row) throw new NotFoundError('This photo has been removed by the workshop.', 'photo_missing')
      const data = await storage.get(variant === 'full' ? row.storageKey : row.thumbKey).catch(() => {
        throw new NotFoundError('This photo’s file is missing.', 'photo_missing')
      })
      return { data, contentType: variant === 'full' ? row.contentType : 'image/jpeg' }
    },

    /** The version the PDF is of: the latest unless another of the customer's versions is named. */
    async pdfVersion(
      me: CustomerPrincipal,
      estimateId: string,
      versionNumber?: number,
    ): Promise<{ workshopId: string; versionId: string }> {
      const { versions, latest } = await ownVersions(me, estimateId)
      const v = versionNumber === undefined ? latest : versions.find((x) => x.version === versionNumber && x.snapshot.customer.id === me.id)
      if (!v) throw new NotFoundError('No such version of this estimate.', 'no_such_version')
      return { workshopId: me.workshop.id, versionId: v.id }
    },

    async ask(req: Request, me: CustomerPrincipal, estimateId: string, input: AskQuestion): Promise<PortalQuestion> {
      return repo.transaction(async (tx) => {
        const estimate = await repo.estimate(tx, me.workshop.id, estimateId)
        const latest = (await repo.versions(tx, me.workshop.id, estimateId)).at(-1)
        if (!estimate || !latest || latest.snapshot.customer.id !== me.id) throw notYours()
        if (estimate.withdrawnAt)
          throw new AppError(410, 'withdrawn', 'The workshop has withdrawn this estimate. Please contact them directly.')
        const s = latest.snapshot
        const item = itemOf(s, input.itemId)
        const row = await repo.insertQuestion(tx, {
          workshopId: me.workshop.id,
          estimateId,
          versionId: latest.id,
          itemId: item.id,
          customerId: me.id,
          question: input.question,
        })
        if (s.workshop.email) {
          const mail = questionEmail(s, me.name, item, input.question, staffEstimateUrl(estimateId))
          await outbox.queue(
            {
              workshopId: me.workshop.id,
              estimateId,
              kind: 'estimate.question',
              to: s.workshop.email,
              subject: mail.subject,
              text: mail.text,
              html: mail.html,
              replyTo: me.email,
            },
            tx,
          )
        }
        await recordAudit(tx, auditContextOf(req), {
          action: 'estimate.question_asked',
          workshopId: me.workshop.id,
          subject: { type: 'estimate', id: estimateId },
          details: { reference: s.reference, version: latest.version, item: `${item.number}: ${item.title}`, questionId: row.id },
        })
        await publishLive(tx, {
          type: 'estimate.question',
          workshopId: me.workshop.id,
          estimateId,
          summary: `${me.name} asked about item ${item.number}: ${input.question}`.slice(0, 300),
        })
        return {
          id: row.id,
          itemId: row.itemId,
          version: latest.version,
          question: row.question,
          answer: null,
          askedAt: row.askedAt.toISOString(),
          answeredAt: null,
        }
      })
    },

    async staffQuestions(me: StaffPrincipal, estimateId: string): Promise<StaffQuestion[]> {
      const [estimate, versions] = await Promise.all([
        repo.estimate(db, me.workshop.id, estimateId),
        repo.versions(db, me.workshop.id, estimateId),
      ])
      if (!estimate) throw new NotFoundError('No such estimate in this workshop.')
      const rows = await repo.questions(db, me.workshop.id, estimateId)
      return rows.map((r) => staffQuestionOf(r, versions))
    },

    /** The advisor's answer, e-mailed to the customer with a fresh link to the current version when it can still be decided on. */
    async answer(req: Request, me: StaffPrincipal, estimateId: string, questionId: string, input: AnswerQuestion): Promise<StaffQuestion> {
      const saved = await repo.transaction(async (tx) => {
        const estimate = await repo.estimate(tx, me.workshop.id, estimateId)
        const question = estimate ? await repo.lockQuestion(tx, me.workshop.id, estimateId, questionId) : undefined
        if (!estimate || !question) throw new NotFoundError('No such question on this estimate.')
        const versions = await repo.versions(tx, me.workshop.id, estimateId)
        const latest = versions.at(-1)
        const askedOn = versions.find((v) => v.id === question.versionId)
        if (!latest || !askedOn) throw new Error('question without its version')
        await repo.answerQuestion(tx, question.id, input.answer, me.id)
        const customer = await repo.customer(tx, me.workshop.id, question.customerId)
        const item = askedOn.snapshot.items.find((i) => i.id === question.itemId)
        if (customer?.email && !customer.archivedAt) {
          const link =
            latest.snapshot.customer.id === customer.id ? await freshLink(tx, me.workshop.id, estimate, latest, customer.id) : null
          const mail = answerEmail(latest.snapshot, customer.name, item, question.question, input.answer, link)
          await outbox.queue(
            {
              workshopId: me.workshop.id,
              estimateId,
              kind: 'estimate.question_answered',
              to: customer.email,
              subject: mail.subject,
              text: mail.text,
              html: mail.html,
              replyTo: latest.snapshot.workshop.email,
              fromName: latest.snapshot.workshop.name,
            },
            tx,
          )
        }
        await recordAudit(tx, auditContextOf(req), {
          action: 'estimate.question_answered',
          workshopId: me.workshop.id,
          subject: { type: 'estimate', id: estimateId },
          details: {
            reference: latest.snapshot.reference,
            questionId,
            item: item ? `${item.number}: ${item.title}` : question.itemId,
            customer: customer?.name ?? null,
          },
        })
        await publishLive(tx, {
          type: 'estimate.question',
          workshopId: me.workshop.id,
          estimateId,
          summary:
            `${me.name} answered ${customer?.name ?? 'the customer'}’s question on ${item ? `item ${item.number}` : 'an item'}`.slice(
              0,
              300,
            ),
        })
        return versions
      })
      const rows = await repo.questions(db, me.workshop.id, estimateId)
      const row = rows.find((r) => r.question.id === questionId)
      if (!row) throw new NotFoundError('No such question on this estimate.')
      return staffQuestionOf(row, saved)
    },
  }

  function staffQuestionOf(row: Awaited<ReturnType<PortalRepo['questions']>>[number], versions: VersionRow[]): StaffQuestion {
    const item = versions.find((v) => v.version === row.version)?.snapshot.items.find((i) => i.id === row.question.itemId)
    return {
      ...questionOf(row),
      itemTitle: item?.title ?? row.question.itemId,
      itemNumber: item?.number ?? 1,
      customerName: row.customerName,
      answeredBy: row.question.answeredBy && row.answeredByName ? { id: row.question.answeredBy, name: row.answeredByName } : null,
    }
  }
}

export type PortalService = ReturnType<typeof createPortalService>
