import express, { type Response } from 'express'
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
} from '../../../shared/schemas/catalogue'
import { IdParamsSchema } from '../../../shared/schemas/common'
import { auditContextOf } from '../../lib/audit'
import { type RouteTable, staffWith } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { handle } from '../../middleware/validate'
import type { AccessStepsService } from './access-steps.service'
import type { ClockTimesService } from './clock-times.service'
import type { LabourFilesService } from './labour-files.service'
import type { LabourOperationsService } from './labour-operations.service'
import type { LabourService } from './labour.service'
import type { PartsService } from './parts.service'
import type { PricingService } from './pricing.service'

/** A CSV upload arrives as the request body itself; the app-wide JSON parser's 1 MB is too small for it. */
const csvBody = express.text({ type: 'text/csv', limit: MAX_IMPORT_BYTES })
const CsvUploadSchema = z.string({ error: 'Send the file as CSV text (Content-Type: text/csv).' }).min(1, 'The file is empty.')
const upload = { body: CsvUploadSchema }
const byId = { params: IdParamsSchema }

/** Excel reads a UTF-8 file as its own legacy encoding unless it starts with a byte-order mark; the import skips the mark. */
function sendCsv(res: Response, filename: string, csv: string) {
  res.type('text/csv; charset=utf-8').attachment(filename).set('Cache-Control', 'no-store').send(`\uFEFF${csv}`)
}

export interface CatalogueServices {
  pricing: PricingService
  labour: LabourService
  operations: LabourOperationsService
  steps: AccessStepsService
  labourFiles: LabourFilesService
  clockTimes: ClockTimesService
  parts: PartsService
}

/**
 * The labour-time table, access steps, parts catalogue and the pricing they are shown with.
 * Advisors read (they quote from it); owners change it; technicians record clock times.
 */
export function catalogueRoutes(table: RouteTable, services: CatalogueServices) {
  const { pricing, labour, operations, steps, labourFiles, clockTimes, parts } = services
  const g = table.group('')
  const read = staffWith('estimates:write')
  const manage = staffWith('catalogue:manage')
  const ws = (req: { user?: Express.User }) => staffOf(req).workshop.id

  g.get('/pricing', read, async (req, res) => {
    res.json(await pricing.get(ws(req)))
  })
  g.put(
    '/pricing',
    manage,
    handle({ body: PricingInputSchema }, async (req, res) => {
      res.json(await pricing.update(auditContextOf(req), staffOf(req), req.body))
    }),
  )

  // Fixed paths before '/:id', which would otherwise take "export" for an id.
  g.get(
    '/labour-operations',
    read,
    handle({ query: LabourSearchQuerySchema }, async (req, res) => {
      res.json(await labour.search(ws(req), req.query))
    }),
  )
  g.get('/labour-operations/export', manage, async (req, res) => {
    sendCsv(res, 'labour-operations.csv', await labourFiles.exportOperations(ws(req)))
  })
  g.get('/labour-operations/template', manage, (_req, res) => {
    sendCsv(res, 'labour-operations-template.csv', labourFiles.operationsTemplate())
  })
  g.post(
    '/labour-operations/import/dry-run',
    manage,
    csvBody,
    handle(upload, async (req, res) => {
      res.json(await labourFiles.checkOperationsImport(ws(req), req.body))
    }),
  )
  g.post(
    '/labour-operations/import',
    manage,
    csvBody,
    handle(upload, async (req, res) => {
      res.json(await labourFiles.importOperations(auditContextOf(req), staffOf(req), req.body))
    }),
  )
  g.get(
    '/labour-operations/time-comparison',
    manage,
    handle({ query: TimeComparisonQuerySchema }, async (req, res) => {
      res.json({ items: await clockTimes.comparison(ws(req), req.query) })
    }),
  )
  g.post(
    '/labour-operations',
    manage,
    handle({ body: LabourOperationInputSchema }, async (req, res) => {
      res.status(201).json(await operations.create(ws(req), req.body))
    }),
  )
  g.get(
    '/labour-operations/:id',
    read,
    handle(byId, async (req, res) => {
      res.json(await labour.get(ws(req), req.params.id))
    }),
  )
  g.put(
    '/labour-operations/:id',
    manage,
    handle({ ...byId, body: LabourOperationInputSchema }, async (req, res) => {
      res.json(await operations.update(ws(req), req.params.id, req.body))
    }),
  )
  g.post(
    '/labour-operations/:id/archive',
    manage,
    handle(byId, async (req, res) => {
      res.json(await operations.setArchived(ws(req), req.params.id, true))
    }),
  )
  g.post(
    '/labour-operations/:id/restore',
    manage,
    handle(byId, async (req, res) => {
      res.json(await operations.setArchived(ws(req), req.params.id, false))
    }),
  )
  g.post(
    '/labour-operations/:id/clock-times',
    staffWith('inspections:write'),
    handle({ ...byId, body: ClockTimeInputSchema }, async (req, res) => {
      res.status(201).json(await clockTimes.record(staffOf(req), req.params.id, req.body))
    }),
  )

  g.get('/access-steps', read, async (req, res) => {
    res.json({ items: await labour.listSteps(ws(req)) })
  })
  g.get('/access-steps/export', manage, async (req, res) => {
    sendCsv(res, 'access-steps.csv', await labourFiles.exportSteps(ws(req)))
  })
  g.get('/access-steps/template', manage, (_req, res) => {
    sendCsv(res, 'access-steps-template.csv', labourFiles.stepsTemplate())
  })
  g.post(
    '/access-steps/import/dry-run',
    manage,
    csvBody,
    handle(upload, async (req, res) => {
      res.json(await labourFiles.checkStepsImport(ws(req), req.body))
    }),
  )
  g.post(
    '/access-steps/import',
    manage,
    csvBody,
    handle(upload, async (req, res) => {
      res.json(await labourFiles.importSteps(auditContextOf(req), staffOf(req), req.body))
    }),
  )
  g.post(
    '/access-steps',
    manage,
    handle({ body: AccessStepInputSchema }, async (req, res) => {
      res.status(201).json(await steps.create(ws(req), req.body))
    }),
  )
  g.put(
    '/access-steps/:id',
    manage,
    handle({ ...byId, body: AccessStepInputSchema }, async (req, res) => {
      res.json(await steps.update(ws(req), req.params.id, req.body))
    }),
  )
  g.delete(
    '/access-steps/:id',
    manage,
    handle(byId, async (req, res) => {
      await steps.remove(ws(req), req.params.id)
      res.status(204).end()
    }),
  )

  g.get(
    '/parts',
    read,
    handle({ query: PartSearchQuerySchema }, async (req, res) => {
      res.json(await parts.search(ws(req), req.query))
    }),
  )
  g.get('/parts/export', manage, async (req, res) => {
    sendCsv(res, 'parts.csv', await parts.export(ws(req)))
  })
  g.get('/parts/template', manage, async (req, res) => {
    sendCsv(res, 'parts-template.csv', await parts.template(ws(req)))
  })
  g.post(
    '/parts/import/dry-run',
    manage,
    csvBody,
    handle(upload, async (req, res) => {
      res.json(await parts.checkImport(ws(req), req.body))
    }),
  )
  g.post(
    '/parts/import',
    manage,
    csvBody,
    handle(upload, async (req, res) => {
      res.json(await parts.import(auditContextOf(req), staffOf(req), req.body))
    }),
  )
  g.post(
    '/parts',
    manage,
    handle({ body: PartInputSchema }, async (req, res) => {
      res.status(201).json(await parts.create(ws(req), req.body))
    }),
  )
  g.get(
    '/parts/:id',
    read,
    handle(byId, async (req, res) => {
      res.json(await parts.get(ws(req), req.params.id))
    }),
  )
  g.put(
    '/parts/:id',
    manage,
    handle({ ...byId, body: PartInputSchema }, async (req, res) => {
      res.json(await parts.update(ws(req), req.params.id, req.body))
    }),
  )
  g.post(
    '/parts/:id/archive',
    manage,
    handle(byId, async (req, res) => {
      res.json(await parts.setArchived(ws(req), req.params.id, true))
    }),
  )
  g.post(
    '/parts/:id/restore',
    manage,
    handle(byId, async (req, res) => {
      res.json(await parts.setArchived(ws(req), req.params.id, false))
    }),
  )

  return g
}
