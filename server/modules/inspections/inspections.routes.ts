import type { Request, RequestHandler } from 'express'
import multer from 'multer'
import { z } from 'zod'
import { IdParamsSchema } from '../../../shared/schemas/common'
import {
  CheckTemplateInputSchema,
  FindingInputSchema,
  RecordResultSchema,
  SafetyCheckSchema,
  StartInspectionSchema,
  type CheckTemplateInput,
  type FindingInput,
  type RecordResult,
  type SafetyCheck,
} from '../../../shared/schemas/inspections'
import { PHOTO_MAX_BYTES, type ProcessedImage, processPhoto } from '../../lib/images'
import { type RouteTable, staffWith } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { validate } from '../../middleware/validate'
import type { InspectionsService } from './inspections.service'

const MAX_PHOTOS_PER_UPLOAD = 10
const ws = (req: Request) => staffOf(req).workshop.id
const id = (req: Request) => (req.params as { id: string }).id

export function inspectionsRoutes(table: RouteTable, service: InspectionsService) {
  const read = staffWith('jobs:read')
  const inspect = staffWith('inspections:write')
  const manage = staffWith('catalogue:manage')
  const writeFindings = staffWith('findings:write')
  const params = validate({ params: IdParamsSchema })

  const templates = table.group('/check-templates')
  templates.get('', read, async (req, res) => {
    res.json({ items: await service.templates(ws(req)) })
  })
  templates.get('/:id', read, params, async (req, res) => {
    res.json(await service.template(ws(req), id(req)))
  })
  templates.post(
    '/:id/copy',
    manage,
    validate({ params: IdParamsSchema, body: z.object({ name: z.string().trim().min(1, 'Name the copy').max(120) }) }),
    async (req, res) => {
      res.status(201).json(await service.copyTemplate(ws(req), id(req), (req.body as { name: string }).name))
    },
  )
  templates.put('/:id', manage, validate({ params: IdParamsSchema, body: CheckTemplateInputSchema }), async (req, res) => {
    res.json(await service.updateTemplate(ws(req), id(req), req.body as CheckTemplateInput))
  })
  templates.post('/:id/archive', manage, params, async (req, res) => {
    res.json(await service.archiveTemplate(ws(req), id(req)))
  })

  const jobScoped = table.group('/jobs')
  jobScoped.get('/:id/inspections', read, params, async (req, res) => {
    res.json({ items: await service.inspectionsOfJob(ws(req), id(req)) })
  })
  jobScoped.post('/:id/inspections', inspect, validate({ params: IdParamsSchema, body: StartInspectionSchema }), async (req, res) => {
    const { inspection, created } = await service.start(staffOf(req), id(req), (req.body as { templateId?: string }).templateId)
    res.status(created ? 201 : 200).json(inspection)
  })
  jobScoped.get('/:id/findings', read, params, async (req, res) => {
    res.json({ items: await service.findingsOfJob(ws(req), id(req)) })
  })
  jobScoped.post('/:id/findings', writeFindings, validate({ params: IdParamsSchema, body: FindingInputSchema }), async (req, res) => {
    res.status(201).json(await service.addFinding(staffOf(req), id(req), req.body as FindingInput))
  })

  const inspections = table.group('/inspections')
  inspections.get('/:id', read, params, async (req, res) => {
    res.json(await service.get(ws(req), id(req)))
  })
  inspections.put('/:id/safety', inspect, validate({ params: IdParamsSchema, body: SafetyCheckSchema }), async (req, res) => {
    res.json(await service.recordSafety(ws(req), id(req), req.body as SafetyCheck))
  })
  inspections.put('/:id/results', inspect, validate({ params: IdParamsSchema, body: RecordResultSchema }), async (req, res) => {
    res.json(await service.recordResult(staffOf(req), id(req), req.body as RecordResult))
  })
  inspections.put(
    '/:id/notes',
    inspect,
    validate({ params: IdParamsSchema, body: z.object({ notes: z.string().max(5000) }) }),
    async (req, res) => {
      res.json(await service.saveNotes(ws(req), id(req), (req.body as { notes: string }).notes))
    },
  )
  inspections.post('/:id/finish', inspect, params, async (req, res) => {
    res.json(await service.finish(ws(req), id(req)))
  })

  const findingsGroup = table.group('/findings')
  findingsGroup.get('/:id', read, params, async (req, res) => {
    res.json(await service.finding(ws(req), id(req)))
  })
  findingsGroup.put('/:id', writeFindings, validate({ params: IdParamsSchema, body: FindingInputSchema }), async (req, res) => {
    res.json(await service.updateFinding(ws(req), id(req), req.body as FindingInput))
  })
  findingsGroup.post('/:id/review', staffWith('estimates:write'), params, async (req, res) => {
    res.json(await service.review(staffOf(req), id(req)))
  })
  findingsGroup.delete('/:id', writeFindings, params, async (req, res) => {
    await service.removeFinding(ws(req), id(req))
    res.status(204).end()
  })
  findingsGroup.post('/:id/photos', writeFindings, params, receivePhotos, async (req, res) => {
    const files = (req.files as Express.Multer.File[] | undefined) ?? []
    // Every file is checked and re-encoded before anything is stored, so one bad file saves nothing.
    const images: ProcessedImage[] = []
    for (const file of files) images.push(await processPhoto(file.buffer))
    res.status(201).json({ items: await service.addPhotos(staffOf(req), id(req), images) })
  })

  const photos = table.group('/photos')
  const sendPhoto =
    (variant: 'full' | 'thumb'): RequestHandler =>
    async (req, res) => {
      const { data, contentType } = await service.photoFile(ws(req), id(req), variant)
      res
        .set('Content-Type', contentType)
        .set(
          'Content-Disposition',
          `inline; filename="photo-${id(req).slice(0, 8)}${variant === 'thumb' ? '-small' : ''}.${contentType === 'image/png' ? 'png' : 'jpg'}"`,
        )
        .set('Cache-Control', 'private, max-age=86400')
        .set('X-Content-Type-Options', 'nosniff')
        .send(data)
    }
  photos.get('/:id', read, params, sendPhoto('full'))
  photos.get('/:id/thumb', read, params, sendPhoto('thumb'))
  photos.delete('/:id', writeFindings, params, async (req, res) => {
    await service.removePhoto(ws(req), id(req))
    res.status(204).end()
  })

  return [templates, jobScoped, inspections, findingsGroup, photos]
}

/** Photos arrive as multipart field `photos`, held in memory only until they are checked and re-encoded. */
const receivePhotos = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: PHOTO_MAX_BYTES, files: MAX_PHOTOS_PER_UPLOAD, fields: 5, parts: MAX_PHOTOS_PER_UPLOAD + 5 },
}).array('photos', MAX_PHOTOS_PER_UPLOAD)
