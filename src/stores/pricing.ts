import { defineStore } from 'pinia'
import { ref } from 'vue'
import * as catalogueApi from '@/api/catalogue'
import type { ApiError } from '@/api/http'
import type { Pricing, PricingInput } from '@shared/schemas/catalogue'
import { attempt } from './record-list'

/** Hourly rates per labour category, the default tax rate and the parts markup bands. */
export const usePricingStore = defineStore('pricing', () => {
  const pricing = ref<Pricing | null>(null)
  const isLoading = ref(false)
  const error = ref<ApiError | null>(null)
  const isSaving = ref(false)
  const saveError = ref<ApiError | null>(null)

  async function load(): Promise<void> {
    await attempt(isLoading, error, async () => {
      pricing.value = await catalogueApi.getPricing()
    })
  }

  async function save(input: PricingInput): Promise<boolean> {
    return attempt(isSaving, saveError, async () => {
      pricing.value = await catalogueApi.savePricing(input)
    })
  }

  return { pricing, isLoading, error, isSaving, saveError, load, save }
})
