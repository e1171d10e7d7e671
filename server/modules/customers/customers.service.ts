import { deleteOrRefuse } from '../../lib/db-errors'
import { NotFoundError } from '../../lib/errors'
import type { Customer, CustomerInput, CustomerListQuery } from '../../../shared/schemas/records'
import type { Page } from '../../../shared/schemas/common'
import type { CustomerRow, CustomersRepo } from './customers.repo'

/** PUT replaces the record: an optional field left out is cleared, not kept (drizzle skips undefined). */
const columns = (input: CustomerInput) => ({
  ...input,
  email: input.email ?? null,
  phone: input.phone ?? null,
  postcode: input.postcode ?? null,
})

const toCustomer = (row: CustomerRow, vehicleCount?: number): Customer => ({
  id: row.id,
  name: row.name,
  email: row.email,
  phone: row.phone,
  addressLines: row.addressLines,
  postcode: row.postcode,
  contactByEmail: row.contactByEmail,
  contactByPhone: row.contactByPhone,
  contactBySms: row.contactBySms,
  archived: row.archivedAt !== null,
  vehicleCount,
  createdAt: row.createdAt.toISOString(),
})

export function createCustomersService(repo: CustomersRepo) {
  async function get(workshopId: string, id: string) {
    const found = await repo.find(workshopId, id)
    if (!found) throw new NotFoundError('No such customer in this workshop.')
    return toCustomer(found.row, found.vehicleCount)
  }
  return {
    async list(workshopId: string, q: CustomerListQuery): Promise<Page<Customer>> {
      const { items, total } = await repo.list(workshopId, q)
      return { items: items.map((i) => toCustomer(i.row, i.vehicleCount)), total, page: q.page, pageSize: q.pageSize }
    },
    get,
    async create(workshopId: string, input: CustomerInput) {
      return toCustomer(await repo.insert(workshopId, input), 0)
    },
    async update(workshopId: string, id: string, input: CustomerInput) {
      const row = await repo.update(workshopId, id, columns(input))
      if (!row) throw new NotFoundError('No such customer in this workshop.')
      return get(workshopId, id)
    },
    async setArchived(workshopId: string, id: string, archived: boolean) {
      const row = await repo.update(workshopId, id, { archivedAt: archived ? new Date() : null })
      if (!row) throw new NotFoundError('No such customer in this workshop.')
      return get(workshopId, id)
    },
    async remove(workshopId: string, id: string) {
      const removed = await deleteOrRefuse(
        () => repo.remove(workshopId, id),
        'This customer has vehicles or jobs on record, so they cannot be deleted. Archive them instead: they disappear from lists but their history is kept.',
      )
      if (!removed) throw new NotFoundError('No such customer in this workshop.')
    },
  }
}

export type CustomersService = ReturnType<typeof createCustomersService>
