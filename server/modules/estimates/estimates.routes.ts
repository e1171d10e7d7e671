import { auditContextOf } from '../../lib/audit'
import { staffWith } from '../../lib/access'
import type { RouteTable } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { handle } from '../../middleware/validate'
import { IdParamsSchema } from '../../../shared/schemas/common'
import {
  AddFindingsSchema,
  CreateEstimateSchema,
  EmailParamsSchema,
  EstimateDefaultsSchema,
  EstimateListQuerySchema,
  SaveDraftSchema,
  SendEstimateSchema,
  VersionParamsSchema,
} from '../../../shared/schemas/estimates'
import type { EstimateDocumentService } from './estimate-document.service'
import type { EstimatesService } from './estimates.service'

export function estimatesRoutes(table: RouteTable, deps: { service: EstimatesService; documents: EstimateDocumentService }) {
  const { service, documents } = deps
  const read = staffWith('estimates:read')
  const write = staffWith('estimates:write')
  const byId = { params: IdParamsSchema }

  const g = table.group('/estimates')
  g.get(
    '',
    read,
    handle({ query: EstimateListQuerySchema }, async (req, res) => {
      res.json(await service.list(staffOf(req).workshop.id, req.query))
    }),
  )
  g.post(
    '',
    write,
    handle({ body: CreateEstimateSchema }, async (req, res) => {
      res.status(201).json(await service.create(auditContextOf(req), staffOf(req), req.body))
    }),
  )
  g.get(
    '/:id',
    read,
    handle(byId, async (req, res) => {
      res.json(await service.get(staffOf(req).workshop.id, req.params.id))
    }),
  )
  g.put(
    '/:id/draft',
    write,
    handle({ ...byId, body: SaveDraftSchema }, async (req, res) => {
      res.json(await service.saveDraft(staffOf(req), req.params.id, req.body))
    }),
  )
  g.post(
    '/:id/findings',
    write,
    handle({ ...byId, body: AddFindingsSchema }, async (req, res) => {
      res.json(await service.addFindings(staffOf(req), req.params.id, req.body))
    }),
  )
  g.post(
    '/:id/send',
    write,
    handle({ ...byId, body: SendEstimateSchema }, async (req, res) => {
      res.json(await service.send(auditContextOf(req), staffOf(req), req.params.id, req.body))
    }),
  )
  g.post(
    '/:id/withdraw',
    write,
    handle(byId, async (req, res) => {
      res.json(await service.withdraw(auditContextOf(req), staffOf(req), req.params.id))
    }),
  )
  g.post(
    '/:id/emails/:emailId/resend',
    write,
    handle({ params: EmailParamsSchema }, async (req, res) => {
      await service.resendEmail(auditContextOf(req), staffOf(req), req.params.id, req.params.emailId)
      res.status(204).end()
    }),
  )
  g.get(
    '/:id/versions/:version/pdf',
    read,
    handle({ params: VersionParamsSchema }, async (req, res) => {
      const workshopId = staffOf(req).workshop.id
      const pdf = await documents.renderVersion(workshopId, await service.versionId(workshopId, req.params.id, req.params.version))
      res
        .type('application/pdf')
        .set('Content-Disposition', `${req.query.download === '1' ? 'attachment' : 'inline'}; filename="${pdf.filename}"`)
        .set('Cache-Control', 'private, no-store')
        .send(Buffer.from(pdf.bytes))
    }),
  )

  const d = table.group('/workshop/estimate-defaults')
  d.get('', read, async (req, res) => {
    res.json(await service.getDefaults(staffOf(req).workshop.id))
  })
  d.put(
    '',
    staffWith('settings:manage'),
    handle({ body: EstimateDefaultsSchema }, async (req, res) => {
      res.json(await service.saveDefaults(auditContextOf(req), staffOf(req), req.body))
    }),
  )
  return [g, d]
}
