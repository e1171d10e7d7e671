import multer from 'multer'
import { z } from 'zod'
import { IdParamsSchema } from '../../../shared/schemas/common'
import {
  CheckTemplateInputSchema,
  FindingInputSchema,
  RecordResultSchema,
  SafetyCheckSchema,
  StartInspectionSchema,
} from '../../../shared/schemas/inspections'
import { PHOTO_MAX_BYTES, type ProcessedImage, processPhoto } from '../../lib/images'
import { type RouteTable, staffWith } from '../../lib/route-table'
import { staffOf } from '../../middleware/auth'
import { handle } from '../../middleware/validate'
import type { InspectionsService } from './inspections.service'

const MAX_PHOTOS_PER_UPLOAD = 10
const ws = (req: { user?: Express.User }) => staffOf(req).workshop.id
const byId = { params: IdParamsSchema }
const CopyTemplateSchema = z.object({ name: z.string().trim().min(1, 'Name the copy').max(120) })
const NotesSchema = z.object({ notes: z.string().max(5000) })

export function inspectionsRoutes(table: RouteTable, service: InspectionsService) {
  const read = staffWith('jobs:read')
  const inspect = staffWith('inspections:write')
  const manage = staffWith('catalogue:manage')
  const writeFindings = staffWith('findings:write')

  const templates = table.group('/check-templates')
  templates.get('', read, async (req, res) => {
    res.json({ items: await service.templates(ws(req)) })
  })
  templates.get(
    '/:id',
    read,
    handle(byId, async (req, res) => {
      res.json(await service.template(ws(req), req.params.id))
    }),
  )
  templates.post(
    '/:id/copy',
    manage,
    handle({ ...byId, body: CopyTemplateSchema }, async (req, res) => {
      res.status(201).json(await service.copyTemplate(ws(req), req.params.id, req.body.name))
    }),
  )
  templates.put(
    '/:id',
    manage,
    handle({ ...byId, body: CheckTemplateInputSchema }, async (req, res) => {
      res.json(await service.updateTemplate(ws(req), req.params.id, req.body))
    }),
  )
  templates.post(
    '/:id/archive',
    manage,
    handle(byId, async (req, res) => {
      res.json(await service.archiveTemplate(ws(req), req.params.id))
    }),
  )

  const jobScoped = table.group('/jobs')
  jobScoped.get(
    '/:id/inspections',
    read,
    handle(byId, async (req, res) => {
      res.json({ items: await service.inspectionsOfJob(ws(req), req.params.id) })
    }),
  )
  jobScoped.post(
    '/:id/inspections',
    inspect,
    handle({ ...byId, body: StartInspectionSchema }, async (req, res) => {
      const { inspection, created } = await service.start(staffOf(req), req.params.id, req.body.templateId)
      res.status(created ? 201 : 200).json(inspection)
    }),
  )
  jobScoped.get(
    '/:id/findings',
    read,
    handle(byId, async (req, res) => {
      res.json({ items: await service.findingsOfJob(ws(req), req.params.id) })
    }),
  )
  jobScoped.post(
    '/:id/findings',
    writeFindings,
    handle({ ...byId, body: FindingInputSchema }, async (req, res) => {
      res.status(201).json(await service.addFinding(staffOf(req), req.params.id, req.body))
    }),
  )

  const inspections = table.group('/inspections')
  inspections.get(
    '/:id',
    read,
    handle(byId, async (req, res) => {
      res.json(await service.get(ws(req), req.params.id))
    }),
  )
  inspections.put(
    '/:id/safety',
    inspect,
    handle({ ...byId, body: SafetyCheckSchema }, async (req, res) => {
      res.json(await service.recordSafety(ws(req), req.params.id, req.body))
    }),
  )
  inspections.put(
    '/:id/results',
    inspect,
    handle({ ...byId, body: RecordResultSchema }, async (req, res) => {
      res.json(await service.recordResult(staffOf(req), req.params.id, req.body))
    }),
  )
  inspections.put(
    '/:id/notes',
    inspect,
    handle({ ...byId, body: NotesSchema }, async (req, res) => {
      res.json(await service.saveNotes(ws(req), req.params.id, req.body.notes))
    }),
  )
  inspections.post(
    '/:id/finish',
    inspect,
    handle(byId, async (req, res) => {
      res.json(await service.finish(ws(req), req.params.id))
    }),
  )

  const findingsGroup = table.group('/findings')
  findingsGroup.get(
    '/:id',
    read,
    handle(byId, async (req, res) => {
      res.json(await service.finding(ws(req), req.params.id))
    }),
  )
  findingsGroup.put(
    '/:id',
    writeFindings,
    handle({ ...byId, body: FindingInputSchema }, async (req, res) => {
      res.json(await service.updateFinding(ws(req), req.params.id, req.body))
    }),
  )
  findingsGroup.post(
    '/:id/review',
    staffWith('estimates:write'),
    handle(byId, async (req, res) => {
      res.json(await service.review(staffOf(req), req.params.id))
    }),
  )
  findingsGroup.delete(
    '/:id',
    writeFindings,
    handle(byId, async (req, res) => {
      await service.removeFinding(ws(req), req.params.id)
      res.status(204).end()
    }),
  )
  // The id is checked before multer reads the upload: a wrong address is refused without taking in the files.
  findingsGroup.post(
    '/:id/photos',
    writeFindings,
    handle(byId, receivePhotos, async (req, res) => {
      const files = Array.isArray(req.files) ? req.files : []
      // Every file is checked and re-encoded before anything is stored, so one bad file saves nothing.
      const images: ProcessedImage[] = []
      for (const file of files) images.push(await processPhoto(file.buffer))
      res.status(201).json({ items: await service.addPhotos(staffOf(req), req.params.id, images) })
    }),
  )

  const photos = table.group('/photos')
  const sendPhoto = (variant: 'full' | 'thumb') =>
    handle(byId, async (req, res) => {
      const { id } = req.params
      const { data, contentType } = await service.photoFile(ws(req), id, variant)
      res
        .set('Content-Type', contentType)
        .set(
          'Content-Disposition',
          `inline; filename="photo-${id.slice(0, 8)}${variant === 'thumb' ? '-small' : ''}.${contentType === 'image/png' ? 'png' : 'jpg'}"`,
        )
        .set('Cache-Control', 'private, max-age=86400')
        .set('X-Content-Type-Options', 'nosniff')
        .send(data)
    })
  photos.get('/:id', read, sendPhoto('full'))
  photos.get('/:id/thumb', read, sendPhoto('thumb'))
  photos.delete(
    '/:id',
    writeFindings,
    handle(byId, async (req, res) => {
      await service.removePhoto(ws(req), req.params.id)
      res.status(204).end()
    }),
  )

  return [templates, jobScoped, inspections, findingsGroup, photos]
}

/** Photos arrive as multipart field `photos`, held in memory only until they are checked and re-encoded. */
const receivePhotos = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: PHOTO_MAX_BYTES, files: MAX_PHOTOS_PER_UPLOAD, fields: 5, parts: MAX_PHOTOS_PER_UPLOAD + 5 },
}).array('photos', MAX_PHOTOS_PER_UPLOAD)
