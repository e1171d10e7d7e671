import type { Logger } from 'pino'
import type { Database } from '../../db/client'
import type { Env } from '../../env'
import { type AuditContext, recordAudit } from '../../lib/audit'
import { type Mailer, sendInBackground } from '../../lib/mailer'
import { hashToken } from '../../lib/tokens'
import type { Principal } from '../../../shared/schemas/auth'
import type { AuthRepo } from './auth.repo'
import { signInEmail } from './auth.emails'

/** Sign-in links live 10 minutes (OWASP ASVS 5.0 6.5.5 asks for a short lifetime for out-of-band codes). */
export const SIGN_IN_LINK_SECONDS = 600

export type Audience = 'staff' | 'customer'

export function createAuthService(deps: { repo: AuthRepo; db: Database; mailer: Mailer; logger: Logger; env: Env }) {
  const { repo, db, mailer, logger, env } = deps

  const linkFor = (audience: Audience, token: string) =>
    `${env.PUBLIC_BASE_URL}${audience === 'staff' ? '/sign-in/link' : '/portal/sign-in/link'}?token=${encodeURIComponent(token)}`

  return {
    /**
     * Stores the hash of a freshly signed token and e-mails the link, for a known address only. The caller
     * answers the same way either way, and the e-mail goes out in the background so timing tells nothing.
     */
    async issueLink(
      ctx: AuditContext,
      audience: Audience,
      email: string,
      token: string,
      purpose: 'sign-in' | 'invite' = 'sign-in',
    ): Promise<void> {
      const expiresAt = new Date(Date.now() + SIGN_IN_LINK_SECONDS * 1000)
      if (audience === 'staff') {
        const staff = await repo.activeStaffByEmail(email)
        if (!staff) {
          logger.info({ audience }, 'sign-in link asked for an address with no account')
          return
        }
        await repo.insertToken({
          tokenHash: hashToken(token),
          principalKind: 'staff',
          staffUserId: staff.id,
          workshopId: staff.workshopId,
          expiresAt,
        })
        await recordAudit(db, ctx, {
          action: 'sign_in.requested',
          workshopId: staff.workshopId,
          actor: { kind: 'anonymous' },
          subject: { type: 'staff', id: staff.id },
        })
        sendInBackground(
          mailer,
          logger,
          signInEmail({
            to: staff.email,
            name: staff.name,
            workshopName: staff.workshopName,
            link: linkFor('staff', token),
            minutes: SIGN_IN_LINK_SECONDS / 60,
            forCustomer: false,
            invitedBy: purpose === 'invite' ? (ctx.actor.name ?? undefined) : undefined,
          }),
          'staff sign-in link',
        )
        return
      }
      // Someone known to several workshops gets the link for the record most recently added; the
      // per-estimate links in their e-mails open each workshop's estimate directly.
      const [customer] = await repo.customersByEmail(email)
      if (!customer) {
        logger.info({ audience }, 'sign-in link asked for an address with no account')
        return
      }
      await repo.insertToken({
        tokenHash: hashToken(token),
        principalKind: 'customer',
        customerId: customer.id,
        workshopId: customer.workshopId,
        expiresAt,
      })
      await recordAudit(db, ctx, {
        action: 'sign_in.requested',
        workshopId: customer.workshopId,
        actor: { kind: 'anonymous' },
        subject: { type: 'customer', id: customer.id },
      })
      sendInBackground(
        mailer,
        logger,
        signInEmail({
          to: customer.email ?? email,
          name: customer.name,
          workshopName: customer.workshopName,
          link: linkFor('customer', token),
          minutes: SIGN_IN_LINK_SECONDS / 60,
          forCustomer: true,
        }),
        'customer sign-in link',
      )
    },

    /** Accepts a link once: the token row is consumed atomically, then the principal is loaded fresh. */
    async acceptLink(ctx: AuditContext, rawToken: string, audience: Audience): Promise<Principal | null> {
      const tokenHash = hashToken(rawToken)
      const row = await repo.consumeToken(tokenHash)
      if (!row) {
        const known = await repo.findToken(tokenHash)
        const reason = !known ? 'unknown' : known.usedAt ? 'already_used' : 'expired'
        await recordAudit(db, ctx, {
          action: 'sign_in.failed',
          workshopId: known?.workshopId ?? null,
          actor: { kind: 'anonymous' },
          details: { reason },
        })
        return null
      }
      if (row.principalKind !== audience) {
        await recordAudit(db, ctx, {
          action: 'sign_in.failed',
          workshopId: row.workshopId,
          actor: { kind: 'anonymous' },
          details: { reason: 'audience_mismatch' },
        })
        return null
      }
      const id = row.principalKind === 'staff' ? row.staffUserId : row.customerId
      const principal = id ? await repo.loadPrincipal(row.principalKind, id) : undefined
      if (!principal) {
        await recordAudit(db, ctx, {
          action: 'sign_in.failed',
          workshopId: row.workshopId,
          actor: { kind: 'anonymous' },
          details: { reason: 'account_inactive' },
        })
        return null
      }
      return principal
    },

    async recordSignIn(ctx: AuditContext, principal: Principal) {
      if (principal.kind === 'staff') await repo.markSignedIn(principal.id)
      await recordAudit(db, ctx, {
        action: 'sign_in.succeeded',
        workshopId: principal.workshop.id,
        actor: { kind: principal.kind, id: principal.id, name: principal.name },
      })
    },

    async recordTamperedLink(ctx: AuditContext) {
      await recordAudit(db, ctx, {
        action: 'sign_in.failed',
        workshopId: null,
        actor: { kind: 'anonymous' },
        details: { reason: 'invalid_signature_or_expired' },
      })
    },

    async recordSignOut(ctx: AuditContext) {
      await recordAudit(db, ctx, { action: 'sign_out', workshopId: ctx.workshopId })
    },
  }
}

export type AuthService = ReturnType<typeof createAuthService>
