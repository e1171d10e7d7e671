import type { Database } from '../../db/client'
import { type AuditContext, recordAudit } from '../../lib/audit'
import { ConflictError, NotFoundError } from '../../lib/errors'
import { iso } from '../../../shared/dates'
import type { StaffPrincipal } from '../../../shared/schemas/auth'
import type { InviteStaff, StaffMember } from '../../../shared/schemas/staff'
import type { StaffRole } from '../../../shared/auth/policy'
import type { AuthRepo } from '../auth/auth.repo'
import type { StaffRepo, StaffRow } from './staff.repo'

const toStaffMember = (row: StaffRow): StaffMember => ({
  id: row.id,
  name: row.name,
  email: row.email,
  role: row.role,
  active: row.deactivatedAt === null,
  lastSignInAt: iso(row.lastSignInAt),
  createdAt: row.createdAt.toISOString(),
})

export function createStaffService(deps: { repo: StaffRepo; authRepo: AuthRepo; db: Database }) {
  const { repo, authRepo, db } = deps

  async function mustFind(me: StaffPrincipal, id: string) {
    const row = await repo.find(me.workshop.id, id)
    if (!row) throw new NotFoundError('No such member of staff in this workshop.')
    return row
  }

  /** A workshop always keeps at least one active owner, or nobody could manage it. */
  async function keepAnOwner(me: StaffPrincipal, target: StaffRow) {
    if (target.role === 'owner' && (await repo.otherActiveOwners(me.workshop.id, target.id)) === 0) {
      throw new ConflictError('This is the only active owner. Make someone else an owner first.', 'last_owner')
    }
  }

  return {
    async list(me: StaffPrincipal) {
      return (await repo.list(me.workshop.id)).map(toStaffMember)
    },

    async invite(ctx: AuditContext, me: StaffPrincipal, input: InviteStaff) {
      if (await repo.emailTaken(input.email))
        throw new ConflictError('Someone already uses that e-mail address on Tickover.', 'email_taken')
      const row = await repo.insert({ workshopId: me.workshop.id, name: input.name, email: input.email, role: input.role })
      await recordAudit(db, ctx, {
        action: 'staff.invited',
        workshopId: me.workshop.id,
        subject: { type: 'staff', id: row.id },
        details: { role: row.role, email: row.email },
      })
      return toStaffMember(row)
    },

    async changeRole(ctx: AuditContext, me: StaffPrincipal, id: string, role: StaffRole) {
      const target = await mustFind(me, id)
      if (target.role === role) return toStaffMember(target)
      if (target.role === 'owner') await keepAnOwner(me, target)
      const row = await repo.update(me.workshop.id, id, { role })
      if (!row) throw new NotFoundError()
      await recordAudit(db, ctx, {
        action: 'staff.role_changed',
        workshopId: me.workshop.id,
        subject: { type: 'staff', id },
        details: { from: target.role, to: role },
      })
      return toStaffMember(row)
    },

    async deactivate(ctx: AuditContext, me: StaffPrincipal, id: string) {
      const target = await mustFind(me, id)
      if (target.id === me.id) throw new ConflictError('You cannot deactivate yourself.', 'self_deactivation')
      if (target.deactivatedAt) return toStaffMember(target)
      await keepAnOwner(me, target)
      const row = await repo.update(me.workshop.id, id, { deactivatedAt: new Date() })
      if (!row) throw new NotFoundError()
      await authRepo.endSessionsOf('staff', id)
      await recordAudit(db, ctx, {
        action: 'staff.deactivated',
        workshopId: me.workshop.id,
        subject: { type: 'staff', id },
      })
      return toStaffMember(row)
    },

    async reactivate(ctx: AuditContext, me: StaffPrincipal, id: string) {
      const target = await mustFind(me, id)
      if (!target.deactivatedAt) return toStaffMember(target)
      const row = await repo.update(me.workshop.id, id, { deactivatedAt: null })
      if (!row) throw new NotFoundError()
      await recordAudit(db, ctx, {
        action: 'staff.reactivated',
        workshopId: me.workshop.id,
        subject: { type: 'staff', id },
      })
      return toStaffMember(row)
    },
  }
}

export type StaffService = ReturnType<typeof createStaffService>
