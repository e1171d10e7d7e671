import type { CheckTemplate, CheckTemplateInput } from '@shared/schemas/inspections'
import { request } from './http'

const path = (id: string) => `/check-templates/${encodeURIComponent(id)}`

/** The templates in use, by name; archived ones are left out. */
export async function listCheckTemplates(): Promise<CheckTemplate[]> {
  const { items } = await request<{ items: CheckTemplate[] }>('GET', '/check-templates')
  return items
}

export function getCheckTemplate(id: string): Promise<CheckTemplate> {
  return request<CheckTemplate>('GET', path(id))
}

/** Owners only (catalogue:manage). */
export function copyCheckTemplate(id: string, name: string): Promise<CheckTemplate> {
  return request<CheckTemplate>('POST', `${path(id)}/copy`, { body: { name } })
}

/** Rejects with 422 whose issues point into the definition, e.g. `['body', 'definition', 'checks', 3, 'prompt']`. */
export function saveCheckTemplate(id: string, input: CheckTemplateInput): Promise<CheckTemplate> {
  return request<CheckTemplate>('PUT', path(id), { body: input })
}

export function archiveCheckTemplate(id: string): Promise<CheckTemplate> {
  return request<CheckTemplate>('POST', `${path(id)}/archive`)
}
