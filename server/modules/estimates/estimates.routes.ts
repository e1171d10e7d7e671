import type { Request } from 'express'
import type { Database } from '../../db/client'
import { type RouteTable, staffWith } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { validate } from '../../middleware/validate'
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
  type AddFindings,
  type CreateEstimate,
  type EstimateDefaults,
  type EstimateListQuery,
  type SaveDraft,
  type SendEstimate,
} from '../../../shared/schemas/estimates'
import { renderVersionPdf } from './estimate-document'
import type { EstimatesService } from './estimates.service'

export function estimatesRoutes(table: RouteTable, deps: { service: EstimatesService; db: Database }) {
  const { service, db } = deps
  const read = staffWith('estimates:read')
  const write = staffWith('estimates:write')
  const id = (req: Request) => (req.params as { id: string }).id

  const g = table.group('/estimates')
  g.get('', read, validate({ query: EstimateListQuerySchema }), async (req, res) => {
    res.json(await service.list(staffOf(req).workshop.id, req.query as unknown as EstimateListQuery))
  })
  g.post('', write, validate({ body: CreateEstimateSchema }), async (req, res) => {
    res.status(201).json(await service.create(req, staffOf(req), req.body as CreateEstimate))
  })
  g.get('/:id', read, validate({ params: IdParamsSchema }), async (req, res) => {
    res.json(await service.get(staffOf(req).workshop.id, id(req)))
  })
  g.put('/:id/draft', write, validate({ params: IdParamsSchema, body: SaveDraftSchema }), async (req, res) => {
    res.json(await service.saveDraft(req, staffOf(req), id(req), req.body as SaveDraft))
  })
  g.post('/:id/findings', write, validate({ params: IdParamsSchema, body: AddFindingsSchema }), async (req, res) => {
    res.json(await service.addFindings(req, staffOf(req), id(req), req.body as AddFindings))
  })
  g.post('/:id/send', write, validate({ params: IdParamsSchema, body: SendEstimateSchema }), async (req, res) => {
    res.json(await service.send(req, staffOf(req), id(req), req.body as SendEstimate))
  })
  g.post('/:id/withdraw', write, validate({ params: IdParamsSchema }), async (req, res) => {
    res.json(await service.withdraw(req, staffOf(req), id(req)))
  })
  g.post('/:id/emails/:emailId/resend', write, validate({ params: EmailParamsSchema }), async (req, res) => {
    const p = req.params as { id: string; emailId: string }
    await service.resendEmail(req, staffOf(req), p.id, p.emailId)
    res.status(204).end()
  })
  g.get('/:id/versions/:version/pdf', read, validate({ params: VersionParamsSchema }), async (req, res) => {
    const p = req.params as unknown as { id: string; version: number }
    const workshopId = staffOf(req).workshop.id
    const found = await service.versionForPdf(workshopId, p.id, p.version)
    const pdf = await renderVersionPdf(db, workshopId, found.version.id)
    res
      .type('application/pdf')
      .set('Content-Disposition', `${req.query.download === '1' ? 'attachment' : 'inline'}; filename="${pdf.filename}"`)
      .set('Cache-Control', 'private, no-store')
      .send(Buffer.from(pdf.bytes))
  })

  const d = table.group('/workshop/estimate-defaults')
  d.get('', read, async (req, res) => {
    res.json(await service.getDefaults(staffOf(req).workshop.id))
  })
  d.put('', staffWith('settings:manage'), validate({ body: EstimateDefaultsSchema }), async (req, res) => {
    res.json(await service.saveDefaults(req, staffOf(req), req.body as EstimateDefaults))
  })
  return [g, d]
}
