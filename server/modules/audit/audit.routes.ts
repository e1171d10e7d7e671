import { AuditListQuerySchema } from '../../../shared/schemas/audit'
import { staffWith } from '../../lib/access'
import type { RouteTable } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { handle } from '../../middleware/validate'
import type { AuditService } from './audit.service'

export function auditRoutes(table: RouteTable, service: AuditService) {
  const g = table.group('/audit-events')
  g.get(
    '',
    staffWith('audit:read'),
    handle({ query: AuditListQuerySchema }, async (req, res) => {
      res.json(await service.list(staffOf(req), req.query))
    }),
  )
  return g
}
