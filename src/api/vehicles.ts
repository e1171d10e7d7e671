import type { Page } from '@shared/schemas/common'
import type { Vehicle, VehicleInput, VehicleListQuery } from '@shared/schemas/records'
import { request } from './http'
import { queryString } from './list-query'

const path = (id: string) => `/vehicles/${encodeURIComponent(id)}`

/** `archived: true` lists only archived vehicles; otherwise only current ones. */
export function listVehicles(params: VehicleListQuery): Promise<Page<Vehicle>> {
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
