import { defineStore } from 'pinia'
import { ref } from 'vue'
import * as catalogueApi from '@/api/catalogue'
import type { ApiError } from '@/api/http'
import type { Part, PartInput } from '@shared/schemas/catalogue'
import { attempt, useRecordList } from './record-list'

/** The parts catalogue. */
export const usePartsStore = defineStore('parts', () => {
  const list = useRecordList((params) => catalogueApi.searchParts(params), {
    options: { page: 1, itemsPerPage: 25, sortBy: [] },
    filters: { archived: false },
    sortKeys: [] as const,
  })

  const isSaving = ref(false)
  const saveError = ref<ApiError | null>(null)

  async function save(input: PartInput, id?: string): Promise<Part | null> {
    let saved: Part | null = null
    await attempt(isSaving, saveError, async () => {
      const part = await catalogueApi.savePart(input, id)
      list.items.value = id ? list.items.value.map((p) => (p.id === id ? part : p)) : list.items.value
      saved = part
    })
    return saved
  }

  async function setArchived(id: string, archived: boolean): Promise<Part | null> {
    let saved: Part | null = null
    await attempt(isSaving, saveError, async () => {
      saved = await catalogueApi.setPartArchived(id, archived)
      list.items.value = list.items.value.filter((p) => p.id !== id)
    })
    return saved
  }

  return {
    ...list,
    isSaving,
    saveError,
    save,
    archive: (id: string) => setArchived(id, true),
    restore: (id: string) => setArchived(id, false),
    clearErrors: () => {
      saveError.value = null
    },
  }
})
