import { request } from './http'

/** Mirrors the select in server/modules/portal/portal.routes.ts. */
export interface PortalVehicle {
  id: string
  registration: string
  make: string
  model: string
  year: number | null
}

export async function listMyVehicles(): Promise<PortalVehicle[]> {
  const { items } = await request<{ items: PortalVehicle[] }>('GET', '/portal/vehicles')
  return items
}
