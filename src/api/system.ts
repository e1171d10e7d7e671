import { request } from './http'

export interface Health {
  status: 'ok'
  uptimeSeconds: number
  version: string
}

export interface Ready {
  status: 'ready'
  database: 'ok'
}

export function getHealth(): Promise<Health> {
  return request<Health>('GET', '/health')
}

/** Rejects with ApiError code `not_ready` (503) when the database cannot be reached. */
export function getReady(): Promise<Ready> {
  return request<Ready>('GET', '/ready')
}
