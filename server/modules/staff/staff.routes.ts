import type { RequestHandler } from 'express'
import { IdParamsSchema } from '../../../shared/schemas/common'
import { ChangeRoleSchema, InviteStaffSchema, type ChangeRole, type InviteStaff } from '../../../shared/schemas/staff'
import { type RouteTable, staffWith } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { validate } from '../../middleware/validate'
import type { StaffService } from './staff.service'

export function staffRoutes(table: RouteTable, deps: { service: StaffService; sendInviteLink: RequestHandler }) {
  const { service } = deps
  const g = table.group('/staff')
  const id = (req: { params: unknown }) => (req.params as { id: string }).id

  g.get('', staffWith('staff:read'), async (req, res) => {
    res.json({ items: await service.list(staffOf(req)) })
  })

  g.post('', staffWith('staff:manage'), validate({ body: InviteStaffSchema }), async (req, res, next) => {
    const member = await service.invite(req, staffOf(req), req.body as InviteStaff)
    res.locals.invited = member
    deps.sendInviteLink(req, res, next)
  })

  g.patch('/:id/role', staffWith('staff:manage'), validate({ params: IdParamsSchema, body: ChangeRoleSchema }), async (req, res) => {
    res.json(await service.changeRole(req, staffOf(req), id(req), (req.body as ChangeRole).role))
  })

  g.post('/:id/deactivate', staffWith('staff:manage'), validate({ params: IdParamsSchema }), async (req, res) => {
    res.json(await service.deactivate(req, staffOf(req), id(req)))
  })

  g.post('/:id/reactivate', staffWith('staff:manage'), validate({ params: IdParamsSchema }), async (req, res) => {
    res.json(await service.reactivate(req, staffOf(req), id(req)))
  })

  return g
}
