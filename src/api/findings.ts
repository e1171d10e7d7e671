import type { Finding, FindingInput, Photo } from '@shared/schemas/inspections'
import { request } from './http'
import { type UploadOptions, uploadForm } from './upload'

const path = (id: string) => `/findings/${encodeURIComponent(id)}`

/** Every finding of the job with its photos. */
export async function listFindings(jobId: string): Promise<Finding[]> {
  const { items } = await request<{ items: Finding[] }>('GET', `/jobs/${encodeURIComponent(jobId)}/findings`)
  return items
}

export function getFinding(id: string): Promise<Finding> {
  return request<Finding>('GET', path(id))
}

/** A finding the check list does not cover. */
export function createFinding(jobId: string, input: FindingInput): Promise<Finding> {
  return request<Finding>('POST', `/jobs/${encodeURIComponent(jobId)}/findings`, { body: input })
}

export function updateFinding(id: string, input: FindingInput): Promise<Finding> {
  return request<Finding>('PUT', path(id), { body: input })
}

export function deleteFinding(id: string): Promise<void> {
  return request<void>('DELETE', path(id))
}

/** Advisors and owners only (estimates:write). */
export function reviewFinding(id: string): Promise<Finding> {
  return request<Finding>('POST', `${path(id)}/review`)
}

/**
 * Up to 10 files, each at most 15 MB and 40 megapixels, JPEG, PNG or WebP by content. All are stored
 * or none: rejects with 413 `photo_too_large` / `too_many_photos`, 415 `unsupported_image`, or 422
 * `image_too_large` / `unreadable_image`, each with a message for the person who sent them.
 */
export async function uploadPhotos(findingId: string, files: readonly File[], options: UploadOptions = {}): Promise<Photo[]> {
  const form = new FormData()
  for (const file of files) form.append('photos', file, file.name)
  const { items } = await uploadForm<{ items: Photo[] }>(`${path(findingId)}/photos`, form, options)
  return items
}

export function deletePhoto(id: string): Promise<void> {
  return request<void>('DELETE', `/photos/${encodeURIComponent(id)}`)
}
