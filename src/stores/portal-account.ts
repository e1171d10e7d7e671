import { defineStore } from 'pinia'
import { type Ref, ref } from 'vue'
import type { ApiError } from '@/api/http'
import * as accountApi from '@/api/portal-account'
import type { PortalVehicle } from '@/api/portal-account'
import type { PortalEstimateSummary } from '@shared/schemas/portal'
import { reportFailure } from './report-failure'

/** One of the customer's own lists: loaded once the account page asks, kept while they stay signed in. */
function ownList<T>(fetchAll: () => Promise<T[]>) {
  const items = ref([]) as Ref<T[]>
  const hasLoaded = ref(false)
  const isLoading = ref(false)
  const error = ref<ApiError | null>(null)

  async function load(): Promise<void> {
    isLoading.value = true
    error.value = null
    try {
      items.value = await fetchAll()
      hasLoaded.value = true
    } catch (cause) {
      error.value = reportFailure(cause)
    } finally {
      isLoading.value = false
    }
  }

  return { items, hasLoaded, isLoading, error, load }
}

/** What a signed-in customer sees of their own records: their vehicles and their estimates. */
export const usePortalAccountStore = defineStore('portal-account', () => {
  const vehicles = ownList<PortalVehicle>(() => accountApi.listMyVehicles())
  const estimates = ownList<PortalEstimateSummary>(() => accountApi.listMyEstimates())

  return {
    vehicles: vehicles.items,
    vehiclesLoaded: vehicles.hasLoaded,
    isLoadingVehicles: vehicles.isLoading,
    vehiclesError: vehicles.error,
    loadVehicles: vehicles.load,
    estimates: estimates.items,
    estimatesLoaded: estimates.hasLoaded,
    isLoadingEstimates: estimates.isLoading,
    estimatesError: estimates.error,
    loadEstimates: estimates.load,
  }
})
