import type { Page } from '@shared/schemas/common'
import type { Job, JobInput, JobListQuery } from '@shared/schemas/records'
import { request } from './http'
import { queryString } from './list-query'

const path = (id: string) => `/jobs/${encodeURIComponent(id)}`

/** Newest first unless a sort is given. */
export function listJobs(params: JobListQuery): Promise<Page<Job>> {
  return request<Page<Job>>('GET', `/jobs${queryString(params)}`)
}

export function getJob(id: string): Promise<Job> {
  return request<Job>('GET', path(id))
}

/** Rejects with 422 on `['body', 'vehicleId']` or `['body', 'technicianId']` for another workshop's vehicle or person. */
export function createJob(input: JobInput): Promise<Job> {
  return request<Job>('POST', '/jobs', { body: input })
}

export function updateJob(id: string, input: JobInput): Promise<Job> {
  return request<Job>('PUT', path(id), { body: input })
}

/** Rejects with code `in_use` (409) once an inspection or estimate points at the job. */
export function deleteJob(id: string): Promise<void> {
  return request<void>('DELETE', path(id))
}
