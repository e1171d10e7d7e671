import type { Database } from '../../db/client'
import { type AuditContext, recordAudit } from '../../lib/audit'
import type { StaffPrincipal } from '../../../shared/schemas/auth'
import type { Pricing, PricingInput } from '../../../shared/schemas/catalogue'
import type { PricingRepo } from './pricing.repo'

/** Flat, worded values, so the audit log reads "standard rate: 8500 → 9000" (minor units). */
function auditView(p: Pricing): Record<string, string | null> {
  const rate = (v: number | null) => (v === null ? null : String(v))
  return {
    'standard rate': rate(p.rates.standard),
    'diagnostic rate': rate(p.rates.diagnostic),
    'specialist rate': rate(p.rates.specialist),
    'default tax rate': `${p.defaultTaxRate}%`,
    'markup bands': p.markupBands.map((b) => `from ${b.fromCostMinor}: ${b.markupPercent}%`).join(', ') || null,
  }
}

export function createPricingService(deps: { repo: PricingRepo; db: Database }) {
  const { repo, db } = deps
  return {
    get: (workshopId: string): Promise<Pricing> => repo.get(workshopId),

    async update(ctx: AuditContext, me: StaffPrincipal, input: PricingInput): Promise<Pricing> {
      const before = await repo.get(me.workshop.id)
      await repo.save(me.workshop.id, input)
      const after = await repo.get(me.workshop.id)
      const was = auditView(before)
      const now = auditView(after)
      const changed = Object.keys(now).filter((k) => was[k] !== now[k])
      if (changed.length > 0) {
        await recordAudit(db, ctx, {
          action: 'settings.changed',
          workshopId: me.workshop.id,
          subject: { type: 'pricing', id: me.workshop.id },
          details: { changed: Object.fromEntries(changed.map((k) => [k, { from: was[k], to: now[k] }])) },
        })
      }
      return after
    },
  }
}

export type PricingService = ReturnType<typeof createPricingService>
