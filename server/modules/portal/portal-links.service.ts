import type { Logger } from 'pino'
import type { Env } from '../../env'
import type { AuditContext } from '../../lib/audit'
import { BadRequestError, GoneError } from '../../lib/errors'
import { hashToken } from '../../lib/tokens'
import type { EmailOutbox } from '../email/outbox'
import { freshLink, portalUrls } from './portal-access'
import { fromWorkshop, renewedLinkEmail } from './portal.emails'
import type { PortalRepoPart } from './portal.repo'
import type { CustomerPrincipal, Principal } from '../../../shared/schemas/auth'
import type { LinkRefusalDetails } from '../../../shared/schemas/portal'

export interface PortalLinksDeps {
  repo: PortalRepoPart<'linkByHash' | 'versions' | 'touchLink' | 'markOpened' | 'customer' | 'linkExpiry' | 'issueLink'>
  outbox: EmailOutbox
  env: Pick<Env, 'PUBLIC_BASE_URL'>
  logger: Logger
  /** The principal a session is started for; the auth module's loader, so a link signs in exactly as a sign-in link does. */
  loadCustomer: (id: string) => Promise<Principal | undefined>
}

const RENEW_ANSWER =
  'If that link belongs to an estimate that can still be decided on, a fresh link is on its way to the e-mail address the workshop has for you.'

/** The customer's estimate links: opening one (which signs the customer in to that estimate) and asking for a fresh one. */
export function createPortalLinksService(deps: PortalLinksDeps) {
  const { repo, outbox, logger } = deps
  const db = repo.db
  const urls = portalUrls(deps.env.PUBLIC_BASE_URL)

  return {
    /**
     * Checks a link and records that it was opened. Refusals a customer can act on answer 410
     * with what the page needs to offer a fresh link; the caller starts the session. The link lives
     * for days where a sign-in link lives 10 minutes because a customer decides over days and the
     * link opens only this estimate for this customer (README, "Estimate links").
     */
    async open(ctx: AuditContext, token: string): Promise<{ principal: CustomerPrincipal; estimateId: string; version: number }> {
      const found = await repo.linkByHash(db, hashToken(token))
      if (!found)
        throw new BadRequestError(
          'We do not recognise this link. Please use the newest e-mail from the workshop, or ask them to send the estimate again.',
          'link_invalid',
        )
      const { link, version, estimate } = found
      const versions = await repo.versions(db, link.workshopId, estimate.id)
      const latest = versions.at(-1) ?? version
      const newerVersion = latest.version > version.version
      const renewable = !estimate.withdrawnAt && !latest.expired && latest.snapshot.customer.id === link.customerId
      const refuse = (code: string, message: string, canRenew = renewable) =>
        new GoneError(message, code, { newerVersion, renewable: canRenew } satisfies LinkRefusalDetails)
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
        await repo.recordAudit(tx, ctx, {
          action: 'estimate.opened',
          workshopId: link.workshopId,
          actor: { kind: 'customer', id: principal.id, name: principal.name },
          subject: { type: 'estimate', id: estimate.id },
          details: { reference: s.reference, version: version.version, firstOpening: first },
        })
        if (first) {
          await repo.publishLive(tx, {
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
    async renew(ctx: AuditContext, token: string): Promise<void> {
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
          const url = await freshLink(repo, urls, tx, { workshopId: link.workshopId, estimate, version: latest, customerId: customer.id })
          if (!url) return null
          const mail = renewedLinkEmail(latest.snapshot, customer.name, url)
          await outbox.queue(
            {
              workshopId: link.workshopId,
              estimateId: estimate.id,
              kind: 'estimate.link_renewed',
              to: customer.email,
              ...mail,
              ...fromWorkshop(latest.snapshot),
            },
            tx,
          )
          await repo.recordAudit(tx, ctx, {
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
  }
}

export type PortalLinksService = ReturnType<typeof createPortalLinksService>
