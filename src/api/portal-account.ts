import type { PortalEstimateList, PortalEstimateSummary } from '@shared/schemas/portal'
import { request } from './http'

/** Mirrors the select in server/modules/portal/portal.routes.ts. */
export interface PortalVehicle {
  id: string
  registration: string
  make: string
  model: string
  year: number | null
}

// Typed from shared/schemas/portal.ts but not parsed with it, like the answers in portal.ts.

export async function listMyVehicles(): Promise<PortalVehicle[]> {
  const { items } = await request<{ items: PortalVehicle[] }>('GET', '/portal/vehicles')
  return items
}

export async function listMyEstimates(): Promise<PortalEstimateSummary[]> {
  const { items } = await request<PortalEstimateList>('GET', '/portal/estimates')
  return items
}
