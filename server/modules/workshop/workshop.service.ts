import type { Database } from '../../db/client'
import { type AuditContext, recordAudit } from '../../lib/audit'
import { NotFoundError } from '../../lib/errors'
import type { StaffPrincipal } from '../../../shared/schemas/auth'
import type { Workshop, WorkshopSettings } from '../../../shared/schemas/workshop'
import type { WorkshopRepo, WorkshopRow } from './workshop.repo'

const toWorkshop = (row: WorkshopRow): Workshop => ({
  id: row.id,
  name: row.name,
  addressLines: row.addressLines,
  postcode: row.postcode,
  phone: row.phone,
  email: row.email,
  vatNumber: row.vatNumber,
  currency: row.currency,
  timezone: row.timezone,
})

export function createWorkshopService(deps: { repo: WorkshopRepo; db: Database }) {
  const { repo, db } = deps
  return {
    async get(me: StaffPrincipal) {
      const row = await repo.find(me.workshop.id)
      if (!row) throw new NotFoundError()
      return toWorkshop(row)
    },

    async update(ctx: AuditContext, me: StaffPrincipal, input: WorkshopSettings) {
      const before = await this.get(me)
      const row = await repo.update(me.workshop.id, input)
      if (!row) throw new NotFoundError()
      const after = toWorkshop(row)
      const changed = (Object.keys(input) as (keyof WorkshopSettings)[]).filter(
        (k) => JSON.stringify(before[k] ?? null) !== JSON.stringify(after[k] ?? null),
      )
      if (changed.length > 0) {
        await recordAudit(db, ctx, {
          action: 'settings.changed',
          workshopId: me.workshop.id,
          subject: { type: 'workshop', id: me.workshop.id },
          details: { changed: Object.fromEntries(changed.map((k) => [k, { from: before[k] ?? null, to: after[k] ?? null }])) },
        })
      }
      return after
    },
  }
}

export type WorkshopService = ReturnType<typeof createWorkshopService>
