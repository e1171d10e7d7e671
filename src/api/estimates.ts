import type { Page } from '@shared/schemas/common'
import type { EstimateDefaults, EstimateDetail, EstimateDraft, EstimateListQuery, EstimateSummary } from '@shared/schemas/estimates'
import { API_BASE, request } from './http'
import { queryString } from './list-query'

const path = (id: string) => `/estimates/${encodeURIComponent(id)}`

/** `q` matches the customer, the registration or the number ("42" or "E-0042"). */
export function listEstimates(params: EstimateListQuery): Promise<Page<EstimateSummary>> {
  return request<Page<EstimateSummary>>('GET', `/estimates${queryString(params)}`)
}

export function getEstimate(id: string): Promise<EstimateDetail> {
  return request<EstimateDetail>('GET', path(id))
}

/** One item per finding straight away; an empty list starts an empty estimate. */
export function createEstimate(jobId: string, findingIds: string[] = []): Promise<EstimateDetail> {
  return request<EstimateDetail>('POST', '/estimates', { body: { jobId, findingIds } })
}

/**
 * Rejects with 409 `stale_revision` when someone saved since `revision`, and 409 `withdrawn` once
 * the estimate is withdrawn.
 */
export function saveDraft(id: string, revision: number, draft: EstimateDraft): Promise<EstimateDetail> {
  return request<EstimateDetail>('PUT', `${path(id)}/draft`, { body: { revision, draft } })
}

/** The server adds one item per finding, priced from the labour-time table and the catalogue. */
export function addFindings(id: string, revision: number, findingIds: string[]): Promise<EstimateDetail> {
  return request<EstimateDetail>('POST', `${path(id)}/findings`, { body: { revision, findingIds } })
}

/** Freezes the draft as a new version and e-mails the customer. */
export function sendEstimate(id: string, revision: number): Promise<EstimateDetail> {
  return request<EstimateDetail>('POST', `${path(id)}/send`, { body: { revision } })
}

export function withdrawEstimate(id: string): Promise<EstimateDetail> {
  return request<EstimateDetail>('POST', `${path(id)}/withdraw`)
}

export function resendEmail(id: string, emailId: string): Promise<void> {
  return request<void>('POST', `${path(id)}/emails/${encodeURIComponent(emailId)}/resend`)
}

/** Answers with the estimate or with nothing; the caller reloads either way. */
export function refundDeposit(id: string): Promise<unknown> {
  return request<unknown>('POST', `${path(id)}/deposit/refund`)
}

/** A plain link: the browser downloads it with the session cookie and the server's file name. */
export const versionPdfUrl = (id: string, version: number) => `${API_BASE}${path(id)}/versions/${version}/pdf?download=1`

export function getEstimateDefaults(): Promise<EstimateDefaults> {
  return request<EstimateDefaults>('GET', '/workshop/estimate-defaults')
}

export function saveEstimateDefaults(input: EstimateDefaults): Promise<EstimateDefaults> {
  return request<EstimateDefaults>('PUT', '/workshop/estimate-defaults', { body: input })
}
