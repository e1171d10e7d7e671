import type { Env } from '../../env'
import type { AuditContext } from '../../lib/audit'
import { ConflictError, GoneError, NotFoundError, ValidationError } from '../../lib/errors'
import type { FileStorage } from '../../lib/storage'
import type { EmailOutbox } from '../email/outbox'
import { cancellationInfo } from './cancellation'
import {
  decisionsOf,
  figures,
  itemOf,
  priced,
  refuseBrokenRequirement,
  refuseClosed,
  refuseConfirmed,
  refuseUndecided,
} from './decision-rules'
import { notYours, portalUrls, versionEntry } from './portal-access'
import { confirmationOf, depositOf, questionOf, statusOf } from './portal-answers'
import { confirmationCopyEmail, confirmationEmail, fromWorkshop } from './portal.emails'
import type { PortalRepoPart, Tx } from './portal.repo'
import { formatMoney } from '../../../shared/money'
import type { CustomerPrincipal } from '../../../shared/schemas/auth'
import type {
  ConfirmEstimate,
  ConfirmResponse,
  DecisionResponse,
  PortalDeposit,
  PortalEstimate,
  PutDecision,
} from '../../../shared/schemas/portal'

/** What the portal needs of the deposits module (server/modules/payments/deposit-checkout.service.ts). */
export interface DepositCheckout {
  startCheckout(ctx: AuditContext, confirmationId: string, urls: { successUrl: string; cancelUrl: string }): Promise<{ url: string }>
}

export interface PortalDecisionsDeps {
  repo: PortalRepoPart<
    | 'estimate'
    | 'versions'
    | 'lockEstimate'
    | 'latestVersionNumber'
    | 'lockVersion'
    | 'decisions'
    | 'saveDecision'
    | 'confirmation'
    | 'insertConfirmation'
    | 'markConfirmed'
    | 'setJobStatus'
    | 'questions'
    | 'photo'
  >
  outbox: EmailOutbox
  deposits: DepositCheckout
  storage: Pick<FileStorage, 'get'>
  env: Pick<Env, 'PUBLIC_BASE_URL'>
}

/** The customer's side of one estimate: reading a version, deciding item by item, confirming, paying the deposit. */
export function createPortalDecisionsService(deps: PortalDecisionsDeps) {
  const { repo, outbox, deposits, storage } = deps
  const db = repo.db
  const urls = portalUrls(deps.env.PUBLIC_BASE_URL)

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

  /** One of the customer's versions: the latest unless another is named. */
  async function ownVersion(me: CustomerPrincipal, estimateId: string, versionNumber: number | undefined) {
    const own = await ownVersions(me, estimateId)
    const shown =
      versionNumber === undefined ? own.latest : own.versions.find((v) => v.version === versionNumber && v.snapshot.customer.id === me.id)
    if (!shown) throw new NotFoundError('No such version of this estimate.', 'no_such_version')
    return { ...own, shown }
  }

  /** Inside a transaction: the same ownership check, with the estimate shared-locked and the versions locked until we commit. */
  async function lockOwn(tx: Tx, me: CustomerPrincipal, estimateId: string, versionNumber: number) {
    const estimate = await repo.lockEstimate(tx, me.workshop.id, estimateId)
    const latestNumber = await repo.latestVersionNumber(tx, me.workshop.id, estimateId)
    if (!estimate || latestNumber === undefined) throw notYours()
    const latest = await repo.lockVersion(tx, me.workshop.id, estimateId, latestNumber)
    if (!latest || latest.snapshot.customer.id !== me.id) throw notYours()
    const version = versionNumber === latestNumber ? latest : await repo.lockVersion(tx, me.workshop.id, estimateId, versionNumber)
    if (!version || version.snapshot.customer.id !== me.id) throw new NotFoundError('No such version of this estimate.', 'no_such_version')
    return { estimate, latest, version }
  }

  return {
    async get(me: CustomerPrincipal, estimateId: string, versionNumber?: number): Promise<PortalEstimate> {
      const { estimate, latest, shown } = await ownVersion(me, estimateId, versionNumber)
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
    async decide(
      ctx: AuditContext,
      me: CustomerPrincipal,
      estimateId: string,
      itemId: string,
      input: PutDecision,
    ): Promise<DecisionResponse> {
      return repo.transaction(async (tx) => {
        const { estimate, latest, version } = await lockOwn(tx, me, estimateId, input.version)
        refuseClosed(estimate, version, latest)
        refuseConfirmed(version)
        const s = version.snapshot
        const item = itemOf(s, itemId)
        const next = decisionsOf(s, { ...(await repo.decisions(tx, me.workshop.id, version.id)), [itemId]: input.decision })
        refuseBrokenRequirement(s, item, next)
        await repo.saveDecision(tx, { workshopId: me.workshop.id, versionId: version.id, itemId, decision: input.decision })
        const result = priced(s, next, 'That choice cannot be priced. Please contact the workshop.')
        await repo.recordAudit(
          tx,
          ctx,
          versionEntry(version, 'estimate.decided', {
            item: `${item.number}: ${item.title}`,
            decision: input.decision,
            approvedGross: result.approved.gross,
          }),
        )
        const verb = { approved: 'approved', declined: 'declined', pending: 'undid their choice on' }[input.decision]
        await repo.publishLive(tx, {
          type: 'estimate.decision',
          workshopId: me.workshop.id,
          estimateId,
          summary: `${me.name} ${verb} item ${item.number}: ${item.title}`.slice(0, 300),
        })
        return { version: version.version, decisions: next, result }
      })
    },

    /**
     * Freezes the stored decisions with the engine's figures, the consents and where they were given
     * from (`ctx.ip`, `ctx.userAgent`), and e-mails the customer their record and the workshop a copy.
     */
    async confirm(
      ctx: AuditContext,
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
        refuseUndecided(s, stored)
        // The server's figures are the truth: the engine prices the stored decisions again here.
        const result = priced(s, stored, 'Your choices cannot be confirmed together. Please check the items marked.')
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
          ip: ctx.ip,
          userAgent: ctx.userAgent,
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
        await repo.recordAudit(
          tx,
          ctx,
          versionEntry(version, 'estimate.confirmed', {
            hash: version.hash,
            approved: Object.values(decisions).filter((d) => d === 'approved').length,
            declined: Object.values(decisions).filter((d) => d === 'declined').length,
            approvedGross: result.approved.gross,
            depositMinor: result.approved.deposit,
            startWithinCancellationPeriod: input.consents.startWithinCancellationPeriod,
          }),
        )
        await repo.publishLive(tx, {
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
          estimateUrl: urls.portalEstimate(estimateId),
        }
        const toCustomer = confirmationEmail(facts)
        await outbox.queue(
          {
            workshopId: me.workshop.id,
            estimateId,
            kind: 'estimate.confirmed',
            to: me.email,
            ...toCustomer,
            ...fromWorkshop(s),
            attachments: [{ type: 'estimate-pdf', versionId: version.id, filename: `${s.reference}-v${version.version}.pdf` }],
          },
          tx,
        )
        if (s.workshop.email) {
          const copy = confirmationCopyEmail(facts, urls.staffEstimate(estimateId))
          await outbox.queue(
            {
              workshopId: me.workshop.id,
              estimateId,
              kind: 'estimate.confirmed.copy',
              to: s.workshop.email,
              ...copy,
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

    async checkout(ctx: AuditContext, me: CustomerPrincipal, estimateId: string): Promise<{ url: string }> {
      const { estimate, latest } = await ownVersions(me, estimateId)
      if (estimate.withdrawnAt)
        throw new GoneError('The workshop has withdrawn this estimate; there is nothing to pay. Please contact them.', 'withdrawn')
      const confirmed = await repo.confirmation(db, me.workshop.id, latest.id)
      if (!confirmed) throw new ConflictError('Please confirm your decisions before paying the deposit.', 'not_confirmed')
      const state = depositOf(confirmed, latest.snapshot.currency)
      if (state.status === 'not_due') throw new ConflictError('No deposit is due on this estimate.', 'no_deposit_due')
      if (state.status !== 'awaiting_payment') throw new ConflictError('The deposit has already been paid.', 'already_paid')
      const { url } = await deposits.startCheckout(ctx, confirmed.confirmation.id, {
        successUrl: `${urls.portalEstimate(estimateId)}/paid?session_id={CHECKOUT_SESSION_ID}`,
        cancelUrl: urls.portalEstimate(estimateId),
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
      const { shown } = await ownVersion(me, estimateId, versionNumber)
      return { workshopId: me.workshop.id, versionId: shown.id }
    },
  }
}

export type PortalDecisionsService = ReturnType<typeof createPortalDecisionsService>
