import { defineStore } from 'pinia'
import { ref } from 'vue'
import * as estimatesApi from '@/api/estimates'
import * as findingsApi from '@/api/findings'
import type { EstimateDetail, EstimateStatus, EstimateSummary } from '@shared/schemas/estimates'
import { useEstimateStore } from './estimate'
import { LIVE_REFRESH_DELAY_MS } from './estimate-live'
import { useNotificationsStore } from './notifications'
import { useRecordList } from './record-list'
import { asApiError, reportFailure } from './report-failure'

/** The estimate on a job, as the job's pages need it. */
export type JobEstimate = Pick<EstimateSummary, 'id' | 'reference' | 'status'>

/** The list of estimates, and the one estimate on each job. */
export const useEstimatesStore = defineStore('estimates', () => {
  const list = useRecordList(estimatesApi.listEstimates, {
    options: { page: 1, itemsPerPage: 25, sortBy: [{ key: 'updatedAt', order: 'desc' }] },
    filters: {} as { status?: EstimateStatus },
    sortKeys: ['number', 'updatedAt', 'customerName', 'proposedGross'],
  })

  /** By job id: undefined until asked, null when the job has no estimate. */
  const byJob = ref<Record<string, JobEstimate | null>>({})
  const isFindingForJob = ref(false)
  const isStarting = ref(false)

  async function findForJob(jobId: string): Promise<void> {
    isFindingForJob.value = true
    try {
      const page = await estimatesApi.listEstimates({ jobId, page: 1, pageSize: 1, sortBy: 'updatedAt', sortDesc: true })
      const found = page.items[0]
      byJob.value = { ...byJob.value, [jobId]: found ? { id: found.id, reference: found.reference, status: found.status } : null }
    } catch (cause) {
      reportFailure(cause)
    } finally {
      isFindingForJob.value = false
    }
  }

  /** A new estimate on the job with an item for every finding that is worse than "All good". */
  async function startForJob(jobId: string): Promise<EstimateDetail | null> {
    isStarting.value = true
    try {
      const findings = await findingsApi.listFindings(jobId)
      const detail = await estimatesApi.createEstimate(
        jobId,
        findings.filter((f) => f.severity !== 'ok').map((f) => f.id),
      )
      byJob.value = { ...byJob.value, [jobId]: { id: detail.id, reference: detail.reference, status: detail.status } }
      useEstimateStore().take(detail)
      return detail
    } catch (cause) {
      const failure = asApiError(cause)
      useNotificationsStore().push('error', failure.message)
      // Someone else started one a moment ago: offer that one instead.
      if (failure.code === 'estimate_exists') void findForJob(jobId)
      return null
    } finally {
      isStarting.value = false
    }
  }

  let refreshTimer: ReturnType<typeof setTimeout> | undefined

  /** For a live event about an estimate in view: one reload of the page for a burst of events. */
  function refreshSoon(): void {
    clearTimeout(refreshTimer)
    refreshTimer = setTimeout(() => void list.load(), LIVE_REFRESH_DELAY_MS)
  }

  function stopRefreshing(): void {
    clearTimeout(refreshTimer)
  }

  return { ...list, byJob, isFindingForJob, isStarting, findForJob, startForJob, refreshSoon, stopRefreshing }
})
