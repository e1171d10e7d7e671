import { deleteOrRefuse } from '../../lib/db-errors'
import { NotFoundError, ValidationError } from '../../lib/errors'
import type { Page } from '../../../shared/schemas/common'
import type { Vehicle, VehicleInput, VehicleListQuery } from '../../../shared/schemas/records'
import type { VehicleRow, VehiclesRepo } from './vehicles.repo'

const toVehicle = (row: VehicleRow, customerName: string): Vehicle => ({
  id: row.id,
  customerId: row.customerId,
  customerName,
  registration: row.registration,
  vin: row.vin,
  make: row.make,
  model: row.model,
  year: row.year,
  odometer: row.odometer,
  odometerUnit: row.odometerUnit,
  vehicleGroup: row.vehicleGroup,
  archived: row.archivedAt !== null,
  createdAt: row.createdAt.toISOString(),
})

/** PUT replaces the record: an optional field left out is cleared, not kept (drizzle skips undefined). */
const columns = (input: VehicleInput) => ({
  ...input,
  vin: input.vin ?? null,
  year: input.year ?? null,
  odometer: input.odometer ?? null,
  vehicleGroup: input.vehicleGroup ?? null,
})

const notFound = () => new NotFoundError('No such vehicle in this workshop.')

export function createVehiclesService(repo: VehiclesRepo) {
  async function get(workshopId: string, id: string) {
    const found = await repo.find(workshopId, id)
    if (!found) throw notFound()
    return toVehicle(found.row, found.customerName)
  }
  async function checkCustomer(workshopId: string, customerId: string) {
    if (!(await repo.customerExists(workshopId, customerId))) {
      throw new ValidationError('Choose a customer of this workshop.', [
        { path: ['body', 'customerId'], message: 'Choose a customer of this workshop' },
      ])
    }
  }
  return {
    async list(workshopId: string, q: VehicleListQuery): Promise<Page<Vehicle>> {
      const { items, total } = await repo.list(workshopId, q)
      return { items: items.map((i) => toVehicle(i.row, i.customerName)), total, page: q.page, pageSize: q.pageSize }
    },
    get,
    async create(workshopId: string, input: VehicleInput) {
      await checkCustomer(workshopId, input.customerId)
      const row = await repo.insert(workshopId, input)
      return get(workshopId, row.id)
    },
    async update(workshopId: string, id: string, input: VehicleInput) {
      await checkCustomer(workshopId, input.customerId)
      if (!(await repo.update(workshopId, id, columns(input)))) throw notFound()
      return get(workshopId, id)
    },
    async setArchived(workshopId: string, id: string, archived: boolean) {
      if (!(await repo.update(workshopId, id, { archivedAt: archived ? new Date() : null }))) throw notFound()
      return get(workshopId, id)
    },
    async remove(workshopId: string, id: string) {
      const removed = await deleteOrRefuse(
        () => repo.remove(workshopId, id),
        'This vehicle has jobs on record, so it cannot be deleted. Archive it instead: it disappears from lists but its history is kept.',
      )
      if (!removed) throw notFound()
    },
  }
}

export type VehiclesService = ReturnType<typeof createVehiclesService>
