import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { ApiError } from '@/api/http'
import * as workshopApi from '@/api/workshop'
import type { Workshop, WorkshopSettings } from '@shared/schemas/workshop'
import { useAuthStore } from './auth'
import { useNotificationsStore } from './notifications'
import { reportFailure } from './report-failure'

export const useWorkshopStore = defineStore('workshop', () => {
  const workshop = ref<Workshop | null>(null)
  const isLoading = ref(false)
  const isSaving = ref(false)
  const error = ref<ApiError | null>(null)

  async function load(): Promise<void> {
    isLoading.value = true
    error.value = null
    try {
      workshop.value = await workshopApi.getWorkshop()
    } catch (cause) {
      error.value = reportFailure(cause)
    } finally {
      isLoading.value = false
    }
  }

  async function save(settings: WorkshopSettings): Promise<boolean> {
    isSaving.value = true
    error.value = null
    try {
      workshop.value = await workshopApi.saveWorkshop(settings)
      useNotificationsStore().push('success', 'Workshop details saved.')
      // The app bar and every time shown read the workshop's name and time zone from the principal.
      await useAuthStore().refresh()
      return true
    } catch (cause) {
      error.value = reportFailure(cause)
      return false
    } finally {
      isSaving.value = false
    }
  }

  return { workshop, isLoading, isSaving, error, load, save }
})
