import { statusOf } from './portal-answers'
import type { PortalRepo } from './portal.repo'
import type { CustomerPrincipal } from '../../../shared/schemas/auth'
import type { PortalEstimateSummary } from '../../../shared/schemas/portal'

/** What a signed-in customer has with the workshop: their estimates and their vehicles. */
export function createPortalService(deps: { repo: Pick<PortalRepo, 'listForCustomer' | 'vehicles'> }) {
  const { repo } = deps
  return {
    async estimates(me: CustomerPrincipal): Promise<PortalEstimateSummary[]> {
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

    async vehicles(me: CustomerPrincipal) {
      return repo.vehicles(me.workshop.id, me.id)
    },
  }
}

export type PortalService = ReturnType<typeof createPortalService>
