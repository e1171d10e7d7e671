import { anyone } from '../../lib/access'
import type { RouteTable } from '../../lib/route-table'
import type { SystemService } from './system.service'

export function systemRoutes(table: RouteTable, service: SystemService) {
  const g = table.group('')
  g.get('/health', anyone, (_req, res) => {
    res.json(service.health())
  })
  g.get('/ready', anyone, async (req, res) => {
    const ready = await service.ready()
    if (ready.ok) {
      res.json({ status: 'ready', database: 'ok' })
      return
    }
    req.log.warn({ reason: ready.reason }, 'not ready')
    res.status(503).json({ error: { code: 'not_ready', message: 'The database cannot be reached right now.' } })
  })
  return g
}
