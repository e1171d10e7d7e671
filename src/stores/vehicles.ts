import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { ApiError } from '@/api/http'
import * as vehiclesApi from '@/api/vehicles'
import type { Vehicle, VehicleInput } from '@shared/schemas/records'
import { attempt, useRecordDetail, useRecordList } from './record-list'

/** A customer rarely keeps more than a handful; one page of this size shows them all. */
const OWNED_PAGE_SIZE = 100

export const useVehiclesStore = defineStore('vehicles', () => {
  const list = useRecordList(vehiclesApi.listVehicles, {
    options: { page: 1, itemsPerPage: 25, sortBy: [{ key: 'registration', order: 'asc' }] },
    filters: { archived: false } as { archived: boolean; customerId?: string },
    sortKeys: ['registration', 'make', 'createdAt'],
  })

  const detail = useRecordDetail<Vehicle, VehicleInput>(list.items, {
    get: vehiclesApi.getVehicle,
    create: vehiclesApi.createVehicle,
    update: vehiclesApi.updateVehicle,
    remove: vehiclesApi.deleteVehicle,
    archive: vehiclesApi.archiveVehicle,
    restore: vehiclesApi.restoreVehicle,
    search: async (q) => (await vehiclesApi.listVehicles({ page: 1, pageSize: 20, sortBy: 'registration', q: q || undefined })).items,
  })
  /** The vehicles of the customer a customer page shows. */
  const owned = ref<{ customerId: string; items: Vehicle[]; total: number } | null>(null)
  const isLoadingOwned = ref(false)
  const ownedError = ref<ApiError | null>(null)

  async function loadOwned(customerId: string): Promise<void> {
    if (owned.value?.customerId !== customerId) owned.value = null
    await attempt(isLoadingOwned, ownedError, async () => {
      const page = await vehiclesApi.listVehicles({ customerId, page: 1, pageSize: OWNED_PAGE_SIZE, sortBy: 'registration' })
      owned.value = { customerId, items: page.items, total: page.total }
    })
  }

  return { ...list, ...detail, owned, isLoadingOwned, ownedError, loadOwned }
})
