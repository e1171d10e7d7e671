import { createPinia, setActivePinia } from 'pinia'
import { beforeEach, describe, expect, it, vi } from 'vitest'
import { ApiError } from '@/api/http'
import { archiveVehicle, createVehicle, deleteVehicle, getVehicle, listVehicles, restoreVehicle, updateVehicle } from '@/api/vehicles'
import { useNotificationsStore } from '@/stores/notifications'
import { useVehiclesStore } from '@/stores/vehicles'
import type { VehicleInput } from '@shared/schemas/records'
import { page, testIds, vehicle } from '../support/records'

vi.mock('@/api/vehicles', () => ({
  listVehicles: vi.fn(),
  getVehicle: vi.fn(),
  createVehicle: vi.fn(),
  updateVehicle: vi.fn(),
  archiveVehicle: vi.fn(),
  restoreVehicle: vi.fn(),
  deleteVehicle: vi.fn(),
}))

const input: VehicleInput = {
  customerId: testIds.customer,
  registration: 'HM15 KNX',
  make: 'Brackwater',
  model: 'Ridgeline 110',
  odometerUnit: 'mi',
}

beforeEach(() => {
  setActivePinia(createPinia())
  for (const fn of [listVehicles, getVehicle, createVehicle, updateVehicle, archiveVehicle, restoreVehicle, deleteVehicle])
    vi.mocked(fn).mockReset()
})

describe('useVehiclesStore', () => {
  it('lists current vehicles by registration, and archived ones on request', async () => {
    vi.mocked(listVehicles).mockResolvedValue(page([vehicle()], 1))
    const vehicles = useVehiclesStore()

    await vehicles.load()
    expect(listVehicles).toHaveBeenLastCalledWith({
      archived: false,
      page: 1,
      pageSize: 25,
      sortBy: 'registration',
      sortDesc: false,
      q: undefined,
    })
    expect(vehicles.items).toEqual([vehicle()])

    await vehicles.setFilters({ archived: true })
    expect(listVehicles).toHaveBeenLastCalledWith(expect.objectContaining({ archived: true, page: 1 }))
  })

  it('loads one customer’s vehicles apart from the list', async () => {
    vi.mocked(listVehicles).mockResolvedValue(page([vehicle()], 1))
    const vehicles = useVehiclesStore()

    await vehicles.loadOwned(testIds.customer)

    expect(listVehicles).toHaveBeenCalledWith({ customerId: testIds.customer, page: 1, pageSize: 100, sortBy: 'registration' })
    expect(vehicles.owned).toEqual({ customerId: testIds.customer, items: [vehicle()], total: 1 })
    expect(vehicles.items).toEqual([])
  })

  it('keeps a 422 on the keeper for the form, without a notification', async () => {
    const invalid = new ApiError(422, 'validation_failed', 'Choose a customer of this workshop.', [
      { path: ['body', 'customerId'], message: 'Choose a customer of this workshop' },
    ])
    vi.mocked(createVehicle).mockRejectedValue(invalid)
    const vehicles = useVehiclesStore()

    await expect(vehicles.save(input)).resolves.toBeNull()

    expect(vehicles.saveError?.issues).toEqual(invalid.issues)
    expect(useNotificationsStore().queue).toEqual([])
  })

  it('saves changes to an existing vehicle', async () => {
    vi.mocked(updateVehicle).mockResolvedValue(vehicle({ odometer: 99_100 }))
    const vehicles = useVehiclesStore()

    expect((await vehicles.save(input, testIds.vehicle))?.odometer).toBe(99_100)
    expect(updateVehicle).toHaveBeenCalledWith(testIds.vehicle, input)
    expect(createVehicle).not.toHaveBeenCalled()
  })

  it('archives instead when deleting is refused', async () => {
    vi.mocked(deleteVehicle).mockRejectedValue(
      new ApiError(409, 'in_use', 'This vehicle has jobs on record, so it cannot be deleted. Archive it instead.'),
    )
    vi.mocked(archiveVehicle).mockResolvedValue(vehicle({ archived: true }))
    const vehicles = useVehiclesStore()

    await expect(vehicles.remove(testIds.vehicle)).resolves.toBe(false)
    expect(vehicles.removeError?.message).toMatch(/Archive it instead/)
    expect((await vehicles.archive(testIds.vehicle))?.archived).toBe(true)
    expect(vehicles.current?.archived).toBe(true)
  })

  it('tells the person when the server fails while archiving', async () => {
    vi.mocked(archiveVehicle).mockRejectedValue(new ApiError(500, 'internal_error', 'Something went wrong on our side. Please try again.'))
    const vehicles = useVehiclesStore()

    await expect(vehicles.archive(testIds.vehicle)).resolves.toBeNull()

    expect(vehicles.isSaving).toBe(false)
    expect(useNotificationsStore().queue).toMatchObject([{ kind: 'error', text: 'Something went wrong on our side. Please try again.' }])
  })

  it('looks vehicles up for a picker', async () => {
    vi.mocked(listVehicles).mockResolvedValue(page([vehicle()], 1))
    const vehicles = useVehiclesStore()

    await vehicles.lookup('hm15')

    expect(listVehicles).toHaveBeenCalledWith({ page: 1, pageSize: 20, sortBy: 'registration', q: 'hm15' })
    expect(vehicles.matches).toEqual([vehicle()])
  })

  it('lets an app bug surface instead of calling it a server problem', async () => {
    vi.mocked(getVehicle).mockRejectedValue(new TypeError('x is not a function'))
    const vehicles = useVehiclesStore()

    await expect(vehicles.get(testIds.vehicle)).rejects.toThrow(TypeError)
    expect(vehicles.isLoadingCurrent).toBe(false)
  })
})
