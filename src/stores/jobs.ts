import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { ApiError } from '@/api/http'
import * as jobsApi from '@/api/jobs'
import type { Job, JobInput, JobStatus } from '@shared/schemas/records'
import { attempt, useRecordDetail, useRecordList } from './record-list'

/** The history on a vehicle's page: the newest jobs, a page of them. */
const HISTORY_PAGE_SIZE = 50

export const useJobsStore = defineStore('jobs', () => {
  const list = useRecordList(jobsApi.listJobs, {
    options: { page: 1, itemsPerPage: 25, sortBy: [{ key: 'createdAt', order: 'desc' }] },
    filters: {} as { status?: JobStatus; technicianId?: string },
    sortKeys: ['createdAt', 'status', 'registration', 'bookedFor'],
  })

  const detail = useRecordDetail<Job, JobInput>(list.items, {
    get: jobsApi.getJob,
    create: jobsApi.createJob,
    update: jobsApi.updateJob,
    remove: jobsApi.deleteJob,
  })
  /** The jobs of the vehicle a vehicle page shows. */
  const history = ref<{ vehicleId: string; items: Job[]; total: number } | null>(null)
  const isLoadingHistory = ref(false)
  const historyError = ref<ApiError | null>(null)

  async function loadHistory(vehicleId: string): Promise<void> {
    if (history.value?.vehicleId !== vehicleId) history.value = null
    await attempt(isLoadingHistory, historyError, async () => {
      const page = await jobsApi.listJobs({ vehicleId, page: 1, pageSize: HISTORY_PAGE_SIZE })
      history.value = { vehicleId, items: page.items, total: page.total }
    })
  }

  return { ...list, ...detail, history, isLoadingHistory, historyError, loadHistory }
})
