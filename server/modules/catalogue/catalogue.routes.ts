import express, { type Request, type Response } from 'express'
import { z } from 'zod'
import {
  AccessStepInputSchema,
  ClockTimeInputSchema,
  LabourOperationInputSchema,
  LabourSearchQuerySchema,
  MAX_IMPORT_BYTES,
  PartInputSchema,
  PartSearchQuerySchema,
  PricingInputSchema,
  TimeComparisonQuerySchema,
  type AccessStepInput,
  type ClockTimeInput,
  type LabourOperationInput,
  type LabourSearchQuery,
  type PartInput,
  type PartSearchQuery,
  type PricingInput,
  type TimeComparisonQuery,
} from '../../../shared/schemas/catalogue'
import { IdParamsSchema } from '../../../shared/schemas/common'
import { type RouteTable, staffWith } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { validate } from '../../middleware/validate'
import type { Database } from '../../db/client'
import { createLabourRepo } from './labour.repo'
import { createLabourService } from './labour.service'
import { createPartsRepo } from './parts.repo'
import { createPartsService } from './parts.service'
import { createPricingRepo } from './pricing.repo'
import { createPricingService } from './pricing.service'

/** A CSV upload arrives as the request body itself; the app-wide JSON parser's 1 MB is too small for it. */
const csvBody = express.text({ type: 'text/csv', limit: MAX_IMPORT_BYTES })
const CsvUploadSchema = z.string({ error: 'Send the file as CSV text (Content-Type: text/csv).' }).min(1, 'The file is empty.')

/** Excel reads a UTF-8 file as its own legacy encoding unless it starts with a byte-order mark; the import skips the mark. */
function sendCsv(res: Response, filename: string, csv: string) {
  res.type('text/csv; charset=utf-8').attachment(filename).set('Cache-Control', 'no-store').send(`\uFEFF${csv}`)
}

/**
 * The labour-time table, access steps, parts catalogue and the pricing they are shown with.
 * Advisors read (they quote from it); owners change it; technicians record clock times.
 */
export function catalogueRoutes(table: RouteTable, db: Database) {
  const pricingRepo = createPricingRepo(db)
  const labour = createLabourService({ repo: createLabourRepo(db), pricing: pricingRepo })
  const parts = createPartsService({ repo: createPartsRepo(db), pricing: pricingRepo })
  const pricing = createPricingService({ repo: pricingRepo, db })
  const g = table.group('')
  const read = staffWith('estimates:write')
  const manage = staffWith('catalogue:manage')
  const ws = (req: Request) => staffOf(req).workshop.id
  const id = (req: Request) => (req.params as { id: string }).id
  const text = (req: Request) => req.body as string
  const upload = [csvBody, validate({ body: CsvUploadSchema })]

  g.get('/pricing', read, async (req, res) => {
    res.json(await pricing.get(ws(req)))
  })
  g.put('/pricing', manage, validate({ body: PricingInputSchema }), async (req, res) => {
    res.json(await pricing.update(req, staffOf(req), req.body as PricingInput))
  })

  // Fixed paths before '/:id', which would otherwise take "export" for an id.
  g.get('/labour-operations', read, validate({ query: LabourSearchQuerySchema }), async (req, res) => {
    res.json(await labour.search(ws(req), req.query as unknown as LabourSearchQuery))
  })
  g.get('/labour-operations/export', manage, async (req, res) => {
    sendCsv(res, 'labour-operations.csv', await labour.exportOperations(ws(req)))
  })
  g.get('/labour-operations/template', manage, (_req, res) => {
    sendCsv(res, 'labour-operations-template.csv', labour.operationsTemplate())
  })
  g.post('/labour-operations/import/dry-run', manage, ...upload, async (req, res) => {
    res.json(await labour.checkOperationsImport(ws(req), text(req)))
  })
  g.post('/labour-operations/import', manage, ...upload, async (req, res) => {
    res.json(await labour.importOperations(req, staffOf(req), text(req)))
  })
  g.get('/labour-operations/time-comparison', manage, validate({ query: TimeComparisonQuerySchema }), async (req, res) => {
    res.json({ items: await labour.timeComparison(ws(req), req.query as unknown as TimeComparisonQuery) })
  })
  g.post('/labour-operations', manage, validate({ body: LabourOperationInputSchema }), async (req, res) => {
    res.status(201).json(await labour.create(ws(req), req.body as LabourOperationInput))
  })
  g.get('/labour-operations/:id', read, validate({ params: IdParamsSchema }), async (req, res) => {
    res.json(await labour.get(ws(req), id(req)))
  })
  g.put('/labour-operations/:id', manage, validate({ params: IdParamsSchema, body: LabourOperationInputSchema }), async (req, res) => {
    res.json(await labour.update(ws(req), id(req), req.body as LabourOperationInput))
  })
  g.post('/labour-operations/:id/archive', manage, validate({ params: IdParamsSchema }), async (req, res) => {
    res.json(await labour.setArchived(ws(req), id(req), true))
  })
  g.post('/labour-operations/:id/restore', manage, validate({ params: IdParamsSchema }), async (req, res) => {
    res.json(await labour.setArchived(ws(req), id(req), false))
  })
  g.post(
    '/labour-operations/:id/clock-times',
    staffWith('inspections:write'),
    validate({ params: IdParamsSchema, body: ClockTimeInputSchema }),
    async (req, res) => {
      res.status(201).json(await labour.recordClockTime(staffOf(req), id(req), req.body as ClockTimeInput))
    },
  )

  g.get('/access-steps', read, async (req, res) => {
    res.json({ items: await labour.listSteps(ws(req)) })
  })
  g.get('/access-steps/export', manage, async (req, res) => {
    sendCsv(res, 'access-steps.csv', await labour.exportSteps(ws(req)))
  })
  g.get('/access-steps/template', manage, (_req, res) => {
    sendCsv(res, 'access-steps-template.csv', labour.stepsTemplate())
  })
  g.post('/access-steps/import/dry-run', manage, ...upload, async (req, res) => {
    res.json(await labour.checkStepsImport(ws(req), text(req)))
  })
  g.post('/access-steps/import', manage, ...upload, async (req, res) => {
    res.json(await labour.importSteps(req, staffOf(req), text(req)))
  })
  g.post('/access-steps', manage, validate({ body: AccessStepInputSchema }), async (req, res) => {
    res.status(201).json(await labour.createStep(ws(req), req.body as AccessStepInput))
  })
  g.put('/access-steps/:id', manage, validate({ params: IdParamsSchema, body: AccessStepInputSchema }), async (req, res) => {
    res.json(await labour.updateStep(ws(req), id(req), req.body as AccessStepInput))
  })
  g.delete('/access-steps/:id', manage, validate({ params: IdParamsSchema }), async (req, res) => {
    await labour.removeStep(ws(req), id(req))
    res.status(204).end()
  })

  g.get('/parts', read, validate({ query: PartSearchQuerySchema }), async (req, res) => {
    res.json(await parts.search(ws(req), req.query as unknown as PartSearchQuery))
  })
  g.get('/parts/export', manage, async (req, res) => {
    sendCsv(res, 'parts.csv', await parts.export(ws(req)))
  })
  g.get('/parts/template', manage, async (req, res) => {
    sendCsv(res, 'parts-template.csv', await parts.template(ws(req)))
  })
  g.post('/parts/import/dry-run', manage, ...upload, async (req, res) => {
    res.json(await parts.checkImport(ws(req), text(req)))
  })
  g.post('/parts/import', manage, ...upload, async (req, res) => {
    res.json(await parts.import(req, staffOf(req), text(req)))
  })
  g.post('/parts', manage, validate({ body: PartInputSchema }), async (req, res) => {
    res.status(201).json(await parts.create(ws(req), req.body as PartInput))
  })
  g.get('/parts/:id', read, validate({ params: IdParamsSchema }), async (req, res) => {
    res.json(await parts.get(ws(req), id(req)))
  })
  g.put('/parts/:id', manage, validate({ params: IdParamsSchema, body: PartInputSchema }), async (req, res) => {
    res.json(await parts.update(ws(req), id(req), req.body as PartInput))
  })
  g.post('/parts/:id/archive', manage, validate({ params: IdParamsSchema }), async (req, res) => {
    res.json(await parts.setArchived(ws(req), id(req), true))
  })
  g.post('/parts/:id/restore', manage, validate({ params: IdParamsSchema }), async (req, res) => {
    res.json(await parts.setArchived(ws(req), id(req), false))
  })

  return g
}
