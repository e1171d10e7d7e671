import { defineStore } from 'pinia'
import { ref } from 'vue'
import * as auditApi from '@/api/audit'
import type { ApiError } from '@/api/http'
import type { AuditEvent, AuditListQuery } from '@shared/schemas/audit'
import { asApiError, reportFailure } from './report-failure'

export const useAuditStore = defineStore('audit', () => {
  const items = ref<AuditEvent[]>([])
  const total = ref(0)
  const isLoading = ref(false)
  const error = ref<ApiError | null>(null)
  let latest = 0

  async function load(query: AuditListQuery): Promise<void> {
    // Filters change faster than a slow connection answers; only the newest answer may fill the table.
    const ticket = ++latest
    isLoading.value = true
    error.value = null
    try {
      const page = await auditApi.listAuditEvents(query)
      if (ticket !== latest) return
      items.value = page.items
      total.value = page.total
    } catch (cause) {
      const failure = asApiError(cause)
      if (ticket === latest) error.value = reportFailure(failure)
    } finally {
      if (ticket === latest) isLoading.value = false
    }
  }

  return { items, total, isLoading, error, load }
})
