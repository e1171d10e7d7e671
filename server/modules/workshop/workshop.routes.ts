import { WorkshopSettingsSchema } from '../../../shared/schemas/workshop'
import { auditContextOf } from '../../lib/audit'
import { staffWith } from '../../lib/access'
import type { RouteTable } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { handle } from '../../middleware/validate'
import type { WorkshopService } from './workshop.service'

export function workshopRoutes(table: RouteTable, service: WorkshopService) {
  const g = table.group('/workshop')
  g.get('', staffWith('workshop:read'), async (req, res) => {
    res.json(await service.get(staffOf(req)))
  })
  g.put(
    '',
    staffWith('settings:manage'),
    handle({ body: WorkshopSettingsSchema }, async (req, res) => {
      res.json(await service.update(auditContextOf(req), staffOf(req), req.body))
    }),
  )
  return g
}
