import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { ApiError } from '@/api/http'
import * as portalApi from '@/api/portal'
import type { PortalVehicle } from '@/api/portal'
import { reportFailure } from './report-failure'

export type { PortalVehicle }

/** What a signed-in customer sees of their own records. */
export const usePortalStore = defineStore('portal', () => {
  const vehicles = ref<PortalVehicle[]>([])
  const hasLoaded = ref(false)
  const isLoading = ref(false)
  const error = ref<ApiError | null>(null)

  async function loadVehicles(): Promise<void> {
    isLoading.value = true
    error.value = null
    try {
      vehicles.value = await portalApi.listMyVehicles()
      hasLoaded.value = true
    } catch (cause) {
      error.value = reportFailure(cause)
    } finally {
      isLoading.value = false
    }
  }

  return { vehicles, hasLoaded, isLoading, error, loadVehicles }
})
