import { defineStore } from 'pinia'
import { ref } from 'vue'
import * as templatesApi from '@/api/check-templates'
import type { ApiError } from '@/api/http'
import type { CheckTemplate, CheckTemplateInput } from '@shared/schemas/inspections'
import { attempt } from './record-list'

export const useCheckTemplatesStore = defineStore('check-templates', () => {
  const items = ref<CheckTemplate[]>([])
  const hasLoaded = ref(false)
  const isLoading = ref(false)
  const error = ref<ApiError | null>(null)
  /** The template the editor shows. */
  const current = ref<CheckTemplate | null>(null)
  const isLoadingCurrent = ref(false)
  const currentError = ref<ApiError | null>(null)
  const isSaving = ref(false)
  /** A 422 here carries issues whose paths point into the definition. */
  const saveError = ref<ApiError | null>(null)
  const isCopying = ref(false)
  const copyError = ref<ApiError | null>(null)
  const isArchiving = ref(false)
  const archiveError = ref<ApiError | null>(null)

  function show(template: CheckTemplate): CheckTemplate {
    if (current.value?.id === template.id) current.value = template
    const listed = items.value.some((t) => t.id === template.id)
    if (template.archived) items.value = items.value.filter((t) => t.id !== template.id)
    else
      items.value = listed
        ? items.value.map((t) => (t.id === template.id ? template : t))
        : [...items.value, template].sort((a, b) => a.name.localeCompare(b.name))
    return template
  }

  async function load(): Promise<void> {
    await attempt(isLoading, error, async () => {
      items.value = await templatesApi.listCheckTemplates()
      hasLoaded.value = true
    })
  }

  async function get(id: string): Promise<CheckTemplate | null> {
    if (current.value?.id !== id) current.value = null
    const ok = await attempt(isLoadingCurrent, currentError, async () => {
      current.value = await templatesApi.getCheckTemplate(id)
    })
    return ok ? current.value : null
  }

  async function copy(id: string, name: string): Promise<CheckTemplate | null> {
    let copied: CheckTemplate | null = null
    await attempt(isCopying, copyError, async () => {
      copied = show(await templatesApi.copyCheckTemplate(id, name))
    })
    return copied
  }

  async function save(id: string, input: CheckTemplateInput): Promise<CheckTemplate | null> {
    let saved: CheckTemplate | null = null
    await attempt(isSaving, saveError, async () => {
      saved = show(await templatesApi.saveCheckTemplate(id, input))
    })
    return saved
  }

  async function archive(id: string): Promise<boolean> {
    return attempt(isArchiving, archiveError, async () => {
      show(await templatesApi.archiveCheckTemplate(id))
    })
  }

  function clearErrors(): void {
    saveError.value = null
    copyError.value = null
    archiveError.value = null
  }

  return {
    items,
    hasLoaded,
    isLoading,
    error,
    current,
    isLoadingCurrent,
    currentError,
    isSaving,
    saveError,
    isCopying,
    copyError,
    isArchiving,
    archiveError,
    load,
    get,
    copy,
    save,
    archive,
    clearErrors,
  }
})
