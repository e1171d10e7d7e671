import type { Inspection, RecordResult, SafetyCheck } from '@shared/schemas/inspections'
import { request } from './http'

const path = (id: string) => `/inspections/${encodeURIComponent(id)}`

/** Newest first as the server keeps them; at most one is unfinished. */
export async function listJobInspections(jobId: string): Promise<Inspection[]> {
  const { items } = await request<{ items: Inspection[] }>('GET', `/jobs/${encodeURIComponent(jobId)}/inspections`)
  return items
}

/**
 * Carries on with the job's unfinished inspection (200) or starts one (201). Rejects with 422 on
 * `['body', 'templateId']` when no template fits the vehicle and none was chosen.
 */
export function startInspection(jobId: string, templateId?: string): Promise<Inspection> {
  return request<Inspection>('POST', `/jobs/${encodeURIComponent(jobId)}/inspections`, { body: templateId ? { templateId } : {} })
}

export function getInspection(id: string): Promise<Inspection> {
  return request<Inspection>('GET', path(id))
}

/** Rejects with 422 on `['body', 'standCapacityKg']` when the stands are rated below the axle load. */
export function saveSafety(id: string, safety: SafetyCheck): Promise<Inspection> {
  return request<Inspection>('PUT', `${path(id)}/safety`, { body: safety })
}

/** Answers the whole inspection. Rejects with 409 `safety_first` before the safety check is recorded. */
export function recordResult(id: string, result: RecordResult): Promise<Inspection> {
  return request<Inspection>('PUT', `${path(id)}/results`, { body: result })
}

export function saveNotes(id: string, notes: string): Promise<Inspection> {
  return request<Inspection>('PUT', `${path(id)}/notes`, { body: { notes } })
}

/** Moves the job on to its estimate. */
export function finishInspection(id: string): Promise<Inspection> {
  return request<Inspection>('POST', `${path(id)}/finish`)
}
