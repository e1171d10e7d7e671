import type { Page } from '@shared/schemas/common'
import type { Vehicle, VehicleInput } from '@shared/schemas/records'
import { request } from './http'
import { type ListParams, queryString } from './list-query'

export type VehicleSortKey = 'registration' | 'make' | 'createdAt'

export interface VehicleListParams extends ListParams<VehicleSortKey> {
  customerId?: string
  /** true lists only archived vehicles; otherwise only current ones. */
  archived?: boolean
}

const path = (id: string) => `/vehicles/${encodeURIComponent(id)}`

export function listVehicles(params: VehicleListParams): Promise<Page<Vehicle>> {
  return request<Page<Vehicle>>('GET', `/vehicles${queryString(params)}`)
}

export function getVehicle(id: string): Promise<Vehicle> {
  return request<Vehicle>('GET', path(id))
}

/** Rejects with 422 on `['body', 'customerId']` when the keeper is not a customer of this workshop. */
export function createVehicle(input: VehicleInput): Promise<Vehicle> {
  return request<Vehicle>('POST', '/vehicles', { body: input })
}

export function updateVehicle(id: string, input: VehicleInput): Promise<Vehicle> {
  return request<Vehicle>('PUT', path(id), { body: input })
}

export function archiveVehicle(id: string): Promise<Vehicle> {
  return request<Vehicle>('POST', `${path(id)}/archive`)
}

export function restoreVehicle(id: string): Promise<Vehicle> {
  return request<Vehicle>('POST', `${path(id)}/restore`)
}

/** Rejects with code `in_use` (409) while jobs point at the vehicle; archiving is the way out. */
export function deleteVehicle(id: string): Promise<void> {
  return request<void>('DELETE', path(id))
}
