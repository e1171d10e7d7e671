import { WorkshopSettingsSchema, type WorkshopSettings } from '../../../shared/schemas/workshop'
import { type RouteTable, staffWith } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { validate } from '../../middleware/validate'
import type { WorkshopService } from './workshop.service'

export function workshopRoutes(table: RouteTable, service: WorkshopService) {
  const g = table.group('/workshop')
  g.get('', staffWith('workshop:read'), async (req, res) => {
    res.json(await service.get(staffOf(req)))
  })
  g.put('', staffWith('settings:manage'), validate({ body: WorkshopSettingsSchema }), async (req, res) => {
    res.json(await service.update(req, staffOf(req), req.body as WorkshopSettings))
  })
  return g
}
