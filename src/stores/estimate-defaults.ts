import { defineStore } from 'pinia'
import { ref } from 'vue'
import * as estimatesApi from '@/api/estimates'
import type { ApiError } from '@/api/http'
import type { EstimateDefaults } from '@shared/schemas/estimates'
import { attempt } from './record-list'

/** What a new estimate starts with: tax basis, rounding, discount, deposit and how long it stays open. */
export const useEstimateDefaultsStore = defineStore('estimate-defaults', () => {
  const defaults = ref<EstimateDefaults | null>(null)
  const isLoading = ref(false)
  const error = ref<ApiError | null>(null)
  const isSaving = ref(false)
  /** A 422 here carries the issues the form shows on its fields. */
  const saveError = ref<ApiError | null>(null)

  async function load(): Promise<void> {
    await attempt(isLoading, error, async () => {
      defaults.value = await estimatesApi.getEstimateDefaults()
    })
  }

  async function save(input: EstimateDefaults): Promise<boolean> {
    return attempt(isSaving, saveError, async () => {
      defaults.value = await estimatesApi.saveEstimateDefaults(input)
    })
  }

  return { defaults, isLoading, error, isSaving, saveError, load, save }
})
