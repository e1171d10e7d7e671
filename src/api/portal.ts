import type {
  AskQuestion,
  CheckoutResponse,
  ConfirmEstimate,
  ConfirmResponse,
  DecisionResponse,
  OpenLinkResponse,
  PortalDeposit,
  PortalEstimate,
  PortalQuestion,
  PutDecision,
  RenewLinkResponse,
} from '@shared/schemas/portal'
import { API_BASE, request } from './http'

// One estimate as its customer opens, decides, confirms and pays for it; their lists are in
// portal-account.ts. The answers are typed from shared/schemas/portal.ts but not parsed with it:
// zod's parsing would add weight to the portal's first load for checks the server already makes.

/** Signs the link's customer in and says which estimate to show. */
export function openEstimateLink(token: string): Promise<OpenLinkResponse> {
  return request<OpenLinkResponse>('POST', '/portal/open', { body: { token } })
}

export function renewEstimateLink(token: string): Promise<RenewLinkResponse> {
  return request<RenewLinkResponse>('POST', '/portal/estimate-links/renew', { body: { token } })
}

const estimatePath = (id: string) => `/portal/estimates/${encodeURIComponent(id)}`

export function getMyEstimate(id: string, version?: number): Promise<PortalEstimate> {
  return request<PortalEstimate>('GET', `${estimatePath(id)}${version === undefined ? '' : `?version=${version}`}`)
}

export function putDecision(id: string, itemId: string, body: PutDecision): Promise<DecisionResponse> {
  return request<DecisionResponse>('PUT', `${estimatePath(id)}/decisions/${encodeURIComponent(itemId)}`, { body })
}

export function askQuestion(id: string, body: AskQuestion): Promise<PortalQuestion> {
  return request<PortalQuestion>('POST', `${estimatePath(id)}/questions`, { body })
}

export function confirmEstimate(id: string, body: ConfirmEstimate): Promise<ConfirmResponse> {
  return request<ConfirmResponse>('POST', `${estimatePath(id)}/confirm`, { body })
}

export function getDeposit(id: string): Promise<PortalDeposit> {
  return request<PortalDeposit>('GET', `${estimatePath(id)}/deposit`)
}

export function startDepositCheckout(id: string): Promise<CheckoutResponse> {
  return request<CheckoutResponse>('POST', `${estimatePath(id)}/deposit/checkout`)
}

/** Addresses the browser loads itself (images, the PDF download), so they carry the session cookie. */
export function photoUrl(id: string, photoId: string, size: 'full' | 'thumb'): string {
  return `${API_BASE}${estimatePath(id)}/photos/${encodeURIComponent(photoId)}${size === 'thumb' ? '/thumb' : ''}`
}

export function pdfUrl(id: string, version?: number): string {
  return `${API_BASE}${estimatePath(id)}/pdf${version === undefined ? '' : `?version=${version}`}`
}
