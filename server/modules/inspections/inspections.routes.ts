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
import { answerById, answerByIdWith, removeById } from '../../lib/record-routes'
import { staffWith } from '../../lib/access'
import type { RouteTable } from '../../lib/route-table'
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
    answerById(({ workshopId, id }) => service.template(workshopId, id)),
  )
  templates.post(
    '/:id/copy',
    manage,
    answerByIdWith(CopyTemplateSchema, ({ workshopId, id, input }) => service.copyTemplate(workshopId, id, input.name), 201),
  )
  templates.put(
    '/:id',
    manage,
    answerByIdWith(CheckTemplateInputSchema, ({ workshopId, id, input }) => service.updateTemplate(workshopId, id, input)),
  )
  templates.post(
    '/:id/archive',
    manage,
    answerById(({ workshopId, id }) => service.archiveTemplate(workshopId, id)),
  )

  const jobScoped = table.group('/jobs')
  jobScoped.get(
    '/:id/inspections',
    read,
    answerById(async ({ workshopId, id }) => ({ items: await service.inspectionsOfJob(workshopId, id) })),
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
    answerById(async ({ workshopId, id }) => ({ items: await service.findingsOfJob(workshopId, id) })),
  )
  jobScoped.post(
    '/:id/findings',
    writeFindings,
    answerByIdWith(FindingInputSchema, ({ id, input, me }) => service.addFinding(me, id, input), 201),
  )

  const inspections = table.group('/inspections')
  inspections.get(
    '/:id',
    read,
    answerById(({ workshopId, id }) => service.get(workshopId, id)),
  )
  inspections.put(
    '/:id/safety',
    inspect,
    answerByIdWith(SafetyCheckSchema, ({ workshopId, id, input }) => service.recordSafety(workshopId, id, input)),
  )
  inspections.put(
    '/:id/results',
    inspect,
    answerByIdWith(RecordResultSchema, ({ id, input, me }) => service.recordResult(me, id, input)),
  )
  inspections.put(
    '/:id/notes',
    inspect,
    answerByIdWith(NotesSchema, ({ workshopId, id, input }) => service.saveNotes(workshopId, id, input.notes)),
  )
  inspections.post(
    '/:id/finish',
    inspect,
    answerById(({ workshopId, id }) => service.finish(workshopId, id)),
  )

  const findingsGroup = table.group('/findings')
  findingsGroup.get(
    '/:id',
    read,
    answerById(({ workshopId, id }) => service.finding(workshopId, id)),
  )
  findingsGroup.put(
    '/:id',
    writeFindings,
    answerByIdWith(FindingInputSchema, ({ workshopId, id, input }) => service.updateFinding(workshopId, id, input)),
  )
  findingsGroup.post(
    '/:id/review',
    staffWith('estimates:write'),
    answerById(({ id, me }) => service.review(me, id)),
  )
  findingsGroup.delete(
    '/:id',
    writeFindings,
    removeById(({ workshopId, id }) => service.removeFinding(workshopId, id)),
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
    removeById(({ workshopId, id }) => service.removePhoto(workshopId, id)),
  )

  return [templates, jobScoped, inspections, findingsGroup, photos]
}

/** Photos arrive as multipart field `photos`, held in memory only until they are checked and re-encoded. */
const receivePhotos = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: PHOTO_MAX_BYTES, files: MAX_PHOTOS_PER_UPLOAD, fields: 5, parts: MAX_PHOTOS_PER_UPLOAD + 5 },
}).array('photos', MAX_PHOTOS_PER_UPLOAD)
