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
  type ImportReport,
} from '../../../shared/schemas/catalogue'
import type { StaffPrincipal } from '../../../shared/schemas/auth'
import { addRecordRoutes, answerByIdWith, removeById } from '../../lib/record-routes'
import { type AuditContext, auditContextOf } from '../../lib/audit'
import { staffWith } from '../../lib/access'
import type { RouteGroup, RouteTable } from '../../lib/route-table'
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

/** Excel reads a UTF-8 file as its own legacy encoding unless it starts with a byte-order mark; the import skips the mark. */
function sendCsv(res: Response, filename: string, csv: string) {
  res.type('text/csv; charset=utf-8').attachment(filename).set('Cache-Control', 'no-store').send(`\uFEFF${csv}`)
}

/** A table's CSV files: what the owner downloads, and an import checked by a dry run before it is committed. */
interface CsvTable {
  export(workshopId: string): Promise<string>
  template(workshopId: string): string | Promise<string>
  check(workshopId: string, text: string): Promise<ImportReport>
  commit(ctx: AuditContext, me: StaffPrincipal, text: string): Promise<ImportReport>
}

function addCsvRoutes(g: RouteGroup, name: string, csv: CsvTable) {
  const manage = staffWith('catalogue:manage')
  g.get(`/${name}/export`, manage, async (req, res) => {
    sendCsv(res, `${name}.csv`, await csv.export(staffOf(req).workshop.id))
  })
  g.get(`/${name}/template`, manage, async (req, res) => {
    sendCsv(res, `${name}-template.csv`, await csv.template(staffOf(req).workshop.id))
  })
  g.post(
    `/${name}/import/dry-run`,
    manage,
    csvBody,
    handle(upload, async (req, res) => {
      res.json(await csv.check(staffOf(req).workshop.id, req.body))
    }),
  )
  g.post(
    `/${name}/import`,
    manage,
    csvBody,
    handle(upload, async (req, res) => {
      res.json(await csv.commit(auditContextOf(req), staffOf(req), req.body))
    }),
  )
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
  addCsvRoutes(g, 'labour-operations', {
    export: labourFiles.exportOperations,
    template: labourFiles.operationsTemplate,
    check: labourFiles.checkOperationsImport,
    commit: labourFiles.importOperations,
  })
  g.get(
    '/labour-operations/time-comparison',
    manage,
    handle({ query: TimeComparisonQuerySchema }, async (req, res) => {
      res.json({ items: await clockTimes.comparison(ws(req), req.query) })
    }),
  )
  addRecordRoutes(g, '/labour-operations', {
    read: 'estimates:write',
    write: 'catalogue:manage',
    input: LabourOperationInputSchema,
    listQuery: LabourSearchQuerySchema,
    service: { list: labour.search, get: labour.get, ...operations },
  })
  g.post(
    '/labour-operations/:id/clock-times',
    staffWith('inspections:write'),
    answerByIdWith(ClockTimeInputSchema, ({ id, input, me }) => clockTimes.record(me, id, input), 201),
  )

  g.get('/access-steps', read, async (req, res) => {
    res.json({ items: await labour.listSteps(ws(req)) })
  })
  addCsvRoutes(g, 'access-steps', {
    export: labourFiles.exportSteps,
    template: labourFiles.stepsTemplate,
    check: labourFiles.checkStepsImport,
    commit: labourFiles.importSteps,
  })
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
    answerByIdWith(AccessStepInputSchema, ({ workshopId, id, input }) => steps.update(workshopId, id, input)),
  )
  g.delete(
    '/access-steps/:id',
    manage,
    removeById(({ workshopId, id }) => steps.remove(workshopId, id)),
  )

  addCsvRoutes(g, 'parts', { export: parts.export, template: parts.template, check: parts.checkImport, commit: parts.import })
  addRecordRoutes(g, '/parts', {
    read: 'estimates:write',
    write: 'catalogue:manage',
    input: PartInputSchema,
    listQuery: PartSearchQuerySchema,
    service: { ...parts, list: parts.search },
  })

  return g
}
