import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { ApiError } from '@/api/http'
import * as vehiclesApi from '@/api/vehicles'
import type { Vehicle, VehicleInput } from '@shared/schemas/records'
import { attempt, useRecordList } from './record-list'

/** A customer rarely keeps more than a handful; one page of this size shows them all. */
const OWNED_PAGE_SIZE = 100

export const useVehiclesStore = defineStore('vehicles', () => {
  const list = useRecordList(vehiclesApi.listVehicles, {
    options: { page: 1, itemsPerPage: 25, sortBy: [{ key: 'registration', order: 'asc' }] },
    filters: { archived: false } as { archived: boolean; customerId?: string },
    sortKeys: ['registration', 'make', 'createdAt'],
  })

  /** The vehicle a detail page shows. */
  const current = ref<Vehicle | null>(null)
  const isLoadingCurrent = ref(false)
  const currentError = ref<ApiError | null>(null)
  /** The vehicles of the customer a customer page shows. */
  const owned = ref<{ customerId: string; items: Vehicle[]; total: number } | null>(null)
  const isLoadingOwned = ref(false)
  const ownedError = ref<ApiError | null>(null)
  const isSaving = ref(false)
  /** A 422 here carries the issues a form shows on its fields. */
  const saveError = ref<ApiError | null>(null)
  const isRemoving = ref(false)
  /** A 409 `in_use` here carries the message the delete dialog shows. */
  const removeError = ref<ApiError | null>(null)
  /** Matches for a vehicle picker, kept apart from the list so searching there leaves the table alone. */
  const matches = ref<Vehicle[]>([])
  const isSearching = ref(false)
  const searchError = ref<ApiError | null>(null)

  function show(vehicle: Vehicle): Vehicle {
    current.value = vehicle
    list.items.value = list.items.value.map((v) => (v.id === vehicle.id ? vehicle : v))
    return vehicle
  }

  async function get(id: string): Promise<Vehicle | null> {
    if (current.value?.id !== id) current.value = null
    // The page says "We can't find that …" itself.
    const ok = await attempt(
      isLoadingCurrent,
      currentError,
      async () => {
        show(await vehiclesApi.getVehicle(id))
      },
      [404],
    )
    return ok ? current.value : null
  }

  async function loadOwned(customerId: string): Promise<void> {
    if (owned.value?.customerId !== customerId) owned.value = null
    await attempt(isLoadingOwned, ownedError, async () => {
      const page = await vehiclesApi.listVehicles({ customerId, page: 1, pageSize: OWNED_PAGE_SIZE, sortBy: 'registration' })
      owned.value = { customerId, items: page.items, total: page.total }
    })
  }

  /** Creates when there is no id; returns the saved vehicle, or null with `saveError` set. */
  async function save(input: VehicleInput, id?: string): Promise<Vehicle | null> {
    let saved: Vehicle | null = null
    await attempt(isSaving, saveError, async () => {
      saved = show(id ? await vehiclesApi.updateVehicle(id, input) : await vehiclesApi.createVehicle(input))
    })
    return saved
  }

  async function setArchived(id: string, archived: boolean): Promise<Vehicle | null> {
    let saved: Vehicle | null = null
    await attempt(isSaving, saveError, async () => {
      saved = show(archived ? await vehiclesApi.archiveVehicle(id) : await vehiclesApi.restoreVehicle(id))
    })
    return saved
  }

  async function remove(id: string): Promise<boolean> {
    const ok = await attempt(isRemoving, removeError, () => vehiclesApi.deleteVehicle(id))
    if (ok) {
      if (current.value?.id === id) current.value = null
      list.items.value = list.items.value.filter((v) => v.id !== id)
    }
    return ok
  }

  async function lookup(q: string): Promise<void> {
    await attempt(isSearching, searchError, async () => {
      matches.value = (await vehiclesApi.listVehicles({ page: 1, pageSize: 20, sortBy: 'registration', q: q.trim() || undefined })).items
    })
  }

  function clearErrors(): void {
    saveError.value = null
    removeError.value = null
  }

  return {
    ...list,
    current,
    isLoadingCurrent,
    currentError,
    owned,
    isLoadingOwned,
    ownedError,
    isSaving,
    saveError,
    isRemoving,
    removeError,
    matches,
    isSearching,
    get,
    loadOwned,
    save,
    archive: (id: string) => setArchived(id, true),
    restore: (id: string) => setArchived(id, false),
    remove,
    lookup,
    clearErrors,
  }
})
