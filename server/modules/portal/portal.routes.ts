import { customerOnly } from '../../lib/access'
import type { RouteTable } from '../../lib/route-table'
import { customerOf } from '../../middleware/auth'
import type { PortalService } from './portal.service'

/** What a signed-in customer sees of their own records: their estimates and their vehicles. */
export function portalRoutes(table: RouteTable, service: PortalService) {
  const g = table.group('/portal')
  g.get('/vehicles', customerOnly, async (req, res) => {
    res.json({ items: await service.vehicles(customerOf(req)) })
  })
  g.get('/estimates', customerOnly, async (req, res) => {
    res.json({ items: await service.estimates(customerOf(req)) })
  })
  return g
}
