import { ConflictError, NotFoundError, ValidationError } from '../../lib/errors'
import type { ProcessedImage } from '../../lib/images'
import type { FileStorage } from '../../lib/storage'
import { ResultMismatchError, suggestSeverity } from '../../../shared/inspection/rules'
import { iso } from '../../../shared/dates'
import type { StaffPrincipal } from '../../../shared/schemas/auth'
import type {
  CheckTemplate,
  CheckTemplateInput,
  Finding,
  FindingInput,
  Inspection,
  InspectionResult,
  Photo,
  RecordResult,
  SafetyCheck,
} from '../../../shared/schemas/inspections'
import type { FindingRow, InspectionRow, InspectionsRepo, PhotoRow, PhotoValues, ResultRow, TemplateRow } from './inspections.repo'

const toTemplate = (r: TemplateRow): CheckTemplate => ({
  id: r.id,
  name: r.name,
  vehicleGroup: r.vehicleGroup,
  definition: r.definition,
  basedOnId: r.basedOnId,
  archived: r.archivedAt !== null,
  updatedAt: r.updatedAt.toISOString(),
})

const toResult = (r: ResultRow): InspectionResult => ({
  id: r.id,
  checkCode: r.checkCode,
  position: r.position,
  value: r.value,
  note: r.note ?? undefined,
  suggestedSeverity: r.suggestedSeverity,
  detail: r.detail,
  recordedAt: r.recordedAt.toISOString(),
  recordedBy: r.recordedBy,
})

const toPhoto = (p: PhotoRow): Photo => ({
  id: p.id,
  width: p.width,
  height: p.height,
  bytes: p.bytes,
  contentType: p.contentType,
  url: `/api/photos/${p.id}`,
  thumbUrl: `/api/photos/${p.id}/thumb`,
  createdAt: p.createdAt.toISOString(),
})

const toFinding = (f: FindingRow, photoRows: PhotoRow[]): Finding => ({
  id: f.id,
  jobId: f.jobId,
  inspectionId: f.inspectionId,
  checkCode: f.checkCode,
  position: f.position,
  title: f.title,
  severity: f.severity,
  explanation: f.explanation,
  measurement: f.measurement,
  suggestedRepair: f.suggestedRepair,
  reviewed: f.reviewedAt !== null,
  photos: photoRows.filter((p) => p.findingId === f.id).map(toPhoto),
  createdAt: f.createdAt.toISOString(),
  updatedAt: f.updatedAt.toISOString(),
})

const notFound = (what: string) => new NotFoundError(`No such ${what} in this workshop.`)

export function createInspectionsService(deps: { repo: InspectionsRepo; storage: FileStorage }) {
  const { repo, storage } = deps

  async function loadInspection(workshopId: string, id: string): Promise<Inspection> {
    const found = await repo.inspection(workshopId, id)
    if (!found) throw notFound('inspection')
    const results = await repo.results(workshopId, id)
    return shapeInspection(found.inspection, found.technicianName, results)
  }

  function shapeInspection(i: InspectionRow, technicianName: string | null, results: ResultRow[]): Inspection {
    return {
      id: i.id,
      jobId: i.jobId,
      templateName: i.templateName,
      definition: i.definition,
      status: i.status,
      safety: i.safety,
      technicianId: i.technicianId,
      technicianName,
      notes: i.notes,
      results: results.map(toResult),
      startedAt: i.startedAt.toISOString(),
      finishedAt: iso(i.finishedAt),
    }
  }

  async function openInspection(workshopId: string, id: string) {
    const found = await repo.inspection(workshopId, id)
    if (!found) throw notFound('inspection')
    if (found.inspection.status === 'finished')
      throw new ConflictError('This inspection is finished. Start a new one to record more.', 'inspection_finished')
    return found.inspection
  }

  return {
    async templates(workshopId: string) {
      return (await repo.templates(workshopId)).map(toTemplate)
    },
    async template(workshopId: string, id: string) {
      const row = await repo.template(workshopId, id)
      if (!row) throw notFound('check template')
      return toTemplate(row)
    },
    async copyTemplate(workshopId: string, id: string, name: string) {
      const source = await repo.template(workshopId, id)
      if (!source) throw notFound('check template')
      return toTemplate(
        await repo.insertTemplate({
          workshopId,
          name,
          vehicleGroup: source.vehicleGroup,
          definition: source.definition,
          basedOnId: source.id,
        }),
      )
    },
    async updateTemplate(workshopId: string, id: string, input: CheckTemplateInput) {
      const row = await repo.updateTemplate(workshopId, id, {
        name: input.name,
        vehicleGroup: input.vehicleGroup ?? null,
        definition: input.definition,
      })
      if (!row) throw notFound('check template')
      return toTemplate(row)
    },
    async archiveTemplate(workshopId: string, id: string) {
      const row = await repo.updateTemplate(workshopId, id, { archivedAt: new Date() })
      if (!row) throw notFound('check template')
      return toTemplate(row)
    },

    async inspectionsOfJob(workshopId: string, jobId: string) {
      if (!(await repo.job(workshopId, jobId))) throw notFound('job')
      const rows = await repo.inspectionsOfJob(workshopId, jobId)
      return Promise.all(
        rows.map(async (r) => shapeInspection(r.inspection, r.technicianName, await repo.results(workshopId, r.inspection.id))),
      )
    },

    /** Carries on with an unfinished inspection of the job if there is one; otherwise starts one from the template for the vehicle's group. */
    async start(me: StaffPrincipal, jobId: string, templateId?: string) {
      const ws = me.workshop.id
      const job = await repo.job(ws, jobId)
      if (!job) throw notFound('job')
      const open = (await repo.inspectionsOfJob(ws, jobId)).find((r) => r.inspection.status !== 'finished')
      if (open) return { inspection: await loadInspection(ws, open.inspection.id), created: false }
      const template = templateId ? await repo.template(ws, templateId) : await repo.templateForGroup(ws, job.vehicleGroup)
      if (!template) {
        throw new ValidationError('There is no check template for this vehicle. Ask the owner to set one up.', [
          { path: ['body', 'templateId'], message: 'Choose a check template' },
        ])
      }
      const id = await repo.transaction(async (tx) => {
        const row = await repo.insertInspection(tx, {
          workshopId: ws,
          jobId,
          templateId: template.id,
          templateName: template.name,
          definition: template.definition,
          technicianId: me.id,
        })
        await repo.setJobStatus(tx, ws, jobId, ['booked_in'], 'inspecting')
        return row.id
      })
      return { inspection: await loadInspection(ws, id), created: true }
    },

    get: loadInspection,

    async recordSafety(workshopId: string, id: string, safety: SafetyCheck) {
      const current = await openInspection(workshopId, id)
      await repo.updateInspection(workshopId, id, { safety, status: current.status === 'safety' ? 'in_progress' : current.status })
      return loadInspection(workshopId, id)
    },

    async saveNotes(workshopId: string, id: string, notes: string) {
      await openInspection(workshopId, id)
      await repo.updateInspection(workshopId, id, { notes })
      return loadInspection(workshopId, id)
    },

    /**
     * Stores a reading and keeps its finding in step: a reading worse than "all good" opens (or updates)
     * a draft finding in the template's words; a reading that is fine again removes an untouched one.
     */
    async recordResult(me: StaffPrincipal, id: string, input: RecordResult) {
      const ws = me.workshop.id
      const inspection = await openInspection(ws, id)
      if (inspection.status === 'safety') throw new ConflictError('Record the safety check before the first reading.', 'safety_first')
      const check = inspection.definition.checks.find((c) => c.code === input.checkCode)
      if (!check)
        throw new ValidationError('That check is not on this inspection.', [{ path: ['body', 'checkCode'], message: 'Unknown check' }])
      if (!check.positions.includes(input.position)) {
        throw new ValidationError('That position does not apply to this check.', [
          { path: ['body', 'position'], message: `Choose one of: ${check.positions.join(', ')}` },
        ])
      }
      let suggestion
      try {
        suggestion = suggestSeverity(check, input.value)
      } catch (err) {
        if (err instanceof ResultMismatchError)
          throw new ValidationError('That reading does not fit this check.', [{ path: ['body', 'value'], message: err.message }])
        throw err
      }
      await repo.transaction(async (tx) => {
        const result = await repo.upsertResult(tx, {
          workshopId: ws,
          inspectionId: id,
          checkCode: check.code,
          position: input.position,
          value: input.value,
          suggestedSeverity: suggestion.severity,
          detail: suggestion.detail,
          note: input.note ?? null,
          recordedBy: me.id,
        })
        const existing = await repo.findingOfResult(tx, result.id)
        const needsFinding = suggestion.severity !== null && suggestion.severity !== 'ok'
        if (needsFinding && !existing) {
          await repo.insertFinding(tx, {
            workshopId: ws,
            jobId: inspection.jobId,
            inspectionId: id,
            resultId: result.id,
            checkCode: check.code,
            position: input.position,
            title: check.findingTitle,
            severity: suggestion.severity ?? 'watch',
            explanation: check.explanation,
            measurement: suggestion.detail,
            suggestedRepair: check.suggestedRepair,
            createdBy: me.id,
          })
        } else if (needsFinding && existing && !existing.reviewedAt) {
          await repo.updateFinding(tx, ws, existing.id, {
            severity: suggestion.severity ?? existing.severity,
            measurement: suggestion.detail,
          })
        } else if (!needsFinding && existing && !existing.reviewedAt) {
          const photoRows = await repo.photosOf(ws, [existing.id])
          if (photoRows.length === 0) await repo.deleteFinding(tx, ws, existing.id)
          else await repo.updateFinding(tx, ws, existing.id, { severity: 'ok', measurement: suggestion.detail })
        }
      })
      return loadInspection(ws, id)
    },

    async finish(workshopId: string, id: string) {
      const inspection = await openInspection(workshopId, id)
      if (inspection.status === 'safety') throw new ConflictError('Record the safety check before finishing.', 'safety_first')
      await repo.transaction(async (tx) => {
        await repo.updateInspection(workshopId, id, { status: 'finished', finishedAt: new Date() }, tx)
        await repo.setJobStatus(tx, workshopId, inspection.jobId, ['booked_in', 'inspecting'], 'quoting')
      })
      return loadInspection(workshopId, id)
    },

    async findingsOfJob(workshopId: string, jobId: string) {
      if (!(await repo.job(workshopId, jobId))) throw notFound('job')
      const rows = await repo.findingsOfJob(workshopId, jobId)
      const photoRows = await repo.photosOf(
        workshopId,
        rows.map((r) => r.id),
      )
      return rows.map((r) => toFinding(r, photoRows))
    },

    async finding(workshopId: string, id: string) {
      const row = await repo.finding(workshopId, id)
      if (!row) throw notFound('finding')
      return toFinding(row, await repo.photosOf(workshopId, [id]))
    },

    async addFinding(me: StaffPrincipal, jobId: string, input: FindingInput) {
      if (!(await repo.job(me.workshop.id, jobId))) throw notFound('job')
      const row = await repo.transaction((tx) =>
        repo.insertFinding(tx, { ...input, measurement: input.measurement ?? null, workshopId: me.workshop.id, jobId, createdBy: me.id }),
      )
      return toFinding(row, [])
    },

    async updateFinding(workshopId: string, id: string, input: FindingInput) {
      const row = await repo.transaction((tx) =>
        repo.updateFinding(tx, workshopId, id, { ...input, measurement: input.measurement ?? null }),
      )
      if (!row) throw notFound('finding')
      return this.finding(workshopId, id)
    },

    async review(me: StaffPrincipal, id: string) {
      const row = await repo.transaction((tx) => repo.updateFinding(tx, me.workshop.id, id, { reviewedAt: new Date(), reviewedBy: me.id }))
      if (!row) throw notFound('finding')
      return this.finding(me.workshop.id, id)
    },

    async removeFinding(workshopId: string, id: string) {
      const photoRows = await repo.photosOf(workshopId, [id])
      const removed = await repo.transaction((tx) => repo.deleteFinding(tx, workshopId, id))
      if (!removed) throw notFound('finding')
      await Promise.all(photoRows.flatMap((p) => [storage.remove(p.storageKey), storage.remove(p.thumbKey)]))
    },

    /** All photos of one upload are stored, or none: files written before a failure are removed again. */
    async addPhotos(me: StaffPrincipal, findingId: string, images: ProcessedImage[]) {
      const ws = me.workshop.id
      if (!(await repo.finding(ws, findingId))) throw notFound('finding')
      if (images.length === 0)
        throw new ValidationError('Choose at least one photo.', [{ path: ['body', 'photos'], message: 'Choose at least one photo' }])
      const written: string[] = []
      try {
        const rows: PhotoValues[] = []
        for (const image of images) {
          const storageKey = await storage.put(image.full, image.extension)
          written.push(storageKey)
          const thumbKey = await storage.put(image.thumb, 'jpg')
          written.push(thumbKey)
          rows.push({
            workshopId: ws,
            findingId,
            storageKey,
            thumbKey,
            contentType: image.contentType,
            width: image.width,
            height: image.height,
            bytes: image.full.length,
            uploadedBy: me.id,
          })
        }
        const inserted = await repo.transaction((tx) => repo.insertPhotos(tx, rows))
        return inserted.map(toPhoto)
      } catch (err) {
        await Promise.all(written.map((k) => storage.remove(k)))
        throw err
      }
    },

    async photoFile(workshopId: string, id: string, variant: 'full' | 'thumb') {
      const row = await repo.photo(workshopId, id)
      if (!row) throw notFound('photo')
      const data = await storage.get(variant === 'full' ? row.storageKey : row.thumbKey).catch(() => {
        throw new NotFoundError('This photo’s file is missing.', 'photo_missing')
      })
      return { data, contentType: variant === 'full' ? row.contentType : 'image/jpeg' }
    },

    async removePhoto(workshopId: string, id: string) {
      const row = await repo.deletePhoto(workshopId, id)
      if (!row) throw notFound('photo')
      await Promise.all([storage.remove(row.storageKey), storage.remove(row.thumbKey)])
    },
  }
}

export type InspectionsService = ReturnType<typeof createInspectionsService>
