import type { Workshop, WorkshopSettings } from '@shared/schemas/workshop'
import { request } from './http'

export function getWorkshop(): Promise<Workshop> {
  return request<Workshop>('GET', '/workshop')
}

export function saveWorkshop(settings: WorkshopSettings): Promise<Workshop> {
  return request<Workshop>('PUT', '/workshop', { body: settings })
}
