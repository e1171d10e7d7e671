import { ChangeRoleSchema, InviteStaffSchema } from '../../../shared/schemas/staff'
import { auditContextOf } from '../../lib/audit'
import { answerById, answerByIdWith } from '../../lib/record-routes'
import { staffWith } from '../../lib/access'
import type { RouteTable } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { handle } from '../../middleware/validate'
import type { InviteSender } from '../auth/auth.routes'
import type { StaffService } from './staff.service'

export function staffRoutes(table: RouteTable, deps: { service: StaffService; sendInvite: InviteSender }) {
  const { service } = deps
  const g = table.group('/staff')
  const manage = staffWith('staff:manage')

  g.get('', staffWith('staff:read'), async (req, res) => {
    res.json({ items: await service.list(staffOf(req)) })
  })

  g.post(
    '',
    manage,
    handle({ body: InviteStaffSchema }, async (req, res, next) => {
      const member = await service.invite(auditContextOf(req), staffOf(req), req.body)
      deps.sendInvite(req, res, member.email, (err) => (err ? next(err) : res.status(201).json(member)))
    }),
  )

  g.patch(
    '/:id/role',
    manage,
    answerByIdWith(ChangeRoleSchema, ({ id, input, me, ctx }) => service.changeRole(ctx, me, id, input.role)),
  )
  g.post(
    '/:id/deactivate',
    manage,
    answerById(({ id, me, ctx }) => service.deactivate(ctx, me, id)),
  )
  g.post(
    '/:id/reactivate',
    manage,
    answerById(({ id, me, ctx }) => service.reactivate(ctx, me, id)),
  )

  return g
}
