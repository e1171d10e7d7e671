import type { Page } from '@shared/schemas/common'
import type { Customer, CustomerInput, CustomerListQuery } from '@shared/schemas/records'
import { request } from './http'
import { queryString } from './list-query'

const path = (id: string) => `/customers/${encodeURIComponent(id)}`

/** `archived: true` lists only archived customers; otherwise only current ones. */
export function listCustomers(params: CustomerListQuery): Promise<Page<Customer>> {
  return request<Page<Customer>>('GET', `/customers${queryString(params)}`)
}

export function getCustomer(id: string): Promise<Customer> {
  return request<Customer>('GET', path(id))
}

/** Rejects with 422 and issues on the fields (`['body', 'email']`…) when the details do not pass. */
export function createCustomer(input: CustomerInput): Promise<Customer> {
  return request<Customer>('POST', '/customers', { body: input })
}

export function updateCustomer(id: string, input: CustomerInput): Promise<Customer> {
  return request<Customer>('PUT', path(id), { body: input })
}

export function archiveCustomer(id: string): Promise<Customer> {
  return request<Customer>('POST', `${path(id)}/archive`)
}

export function restoreCustomer(id: string): Promise<Customer> {
  return request<Customer>('POST', `${path(id)}/restore`)
}

/** Rejects with code `in_use` (409) while vehicles point at the customer; archiving is the way out. */
export function deleteCustomer(id: string): Promise<void> {
  return request<void>('DELETE', path(id))
}
