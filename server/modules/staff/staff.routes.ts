import { IdParamsSchema } from '../../../shared/schemas/common'
import { ChangeRoleSchema, InviteStaffSchema } from '../../../shared/schemas/staff'
import { auditContextOf } from '../../lib/audit'
import { type RouteTable, staffWith } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { handle } from '../../middleware/validate'
import type { InviteSender } from '../auth/auth.routes'
import type { StaffService } from './staff.service'

export function staffRoutes(table: RouteTable, deps: { service: StaffService; sendInvite: InviteSender }) {
  const { service } = deps
  const g = table.group('/staff')
  const manage = staffWith('staff:manage')
  const byId = { params: IdParamsSchema }

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
    handle({ ...byId, body: ChangeRoleSchema }, async (req, res) => {
      res.json(await service.changeRole(auditContextOf(req), staffOf(req), req.params.id, req.body.role))
    }),
  )

  g.post(
    '/:id/deactivate',
    manage,
    handle(byId, async (req, res) => {
      res.json(await service.deactivate(auditContextOf(req), staffOf(req), req.params.id))
    }),
  )

  g.post(
    '/:id/reactivate',
    manage,
    handle(byId, async (req, res) => {
      res.json(await service.reactivate(auditContextOf(req), staffOf(req), req.params.id))
    }),
  )

  return g
}
