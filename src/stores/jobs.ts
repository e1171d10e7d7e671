import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { ApiError } from '@/api/http'
import * as jobsApi from '@/api/jobs'
import type { Job, JobInput, JobStatus } from '@shared/schemas/records'
import { attempt, useRecordList } from './record-list'

/** The history on a vehicle's page: the newest jobs, a page of them. */
const HISTORY_PAGE_SIZE = 50

export const useJobsStore = defineStore('jobs', () => {
  const list = useRecordList(jobsApi.listJobs, {
    options: { page: 1, itemsPerPage: 25, sortBy: [{ key: 'createdAt', order: 'desc' }] },
    filters: {} as { status?: JobStatus; technicianId?: string },
    sortKeys: ['createdAt', 'status', 'registration', 'bookedFor'],
  })

  /** The job a detail page shows. */
  const current = ref<Job | null>(null)
  const isLoadingCurrent = ref(false)
  const currentError = ref<ApiError | null>(null)
  /** The jobs of the vehicle a vehicle page shows. */
  const history = ref<{ vehicleId: string; items: Job[]; total: number } | null>(null)
  const isLoadingHistory = ref(false)
  const historyError = ref<ApiError | null>(null)
  const isSaving = ref(false)
  /** A 422 here carries the issues a form shows on its fields. */
  const saveError = ref<ApiError | null>(null)
  const isRemoving = ref(false)
  /** A 409 `in_use` here carries the message the delete dialog shows. */
  const removeError = ref<ApiError | null>(null)

  function show(job: Job): Job {
    current.value = job
    list.items.value = list.items.value.map((j) => (j.id === job.id ? job : j))
    return job
  }

  async function get(id: string): Promise<Job | null> {
    if (current.value?.id !== id) current.value = null
    // The page says "We can't find that …" itself.
    const ok = await attempt(
      isLoadingCurrent,
      currentError,
      async () => {
        show(await jobsApi.getJob(id))
      },
      [404],
    )
    return ok ? current.value : null
  }

  async function loadHistory(vehicleId: string): Promise<void> {
    if (history.value?.vehicleId !== vehicleId) history.value = null
    await attempt(isLoadingHistory, historyError, async () => {
      const page = await jobsApi.listJobs({ vehicleId, page: 1, pageSize: HISTORY_PAGE_SIZE })
      history.value = { vehicleId, items: page.items, total: page.total }
    })
  }

  /** Creates when there is no id; returns the saved job, or null with `saveError` set. */
  async function save(input: JobInput, id?: string): Promise<Job | null> {
    let saved: Job | null = null
    await attempt(isSaving, saveError, async () => {
      saved = show(id ? await jobsApi.updateJob(id, input) : await jobsApi.createJob(input))
    })
    return saved
  }

  async function remove(id: string): Promise<boolean> {
    const ok = await attempt(isRemoving, removeError, () => jobsApi.deleteJob(id))
    if (ok) {
      if (current.value?.id === id) current.value = null
      list.items.value = list.items.value.filter((j) => j.id !== id)
    }
    return ok
  }

  function clearErrors(): void {
    saveError.value = null
    removeError.value = null
  }

  return {
    ...list,
    current,
    isLoadingCurrent,
    currentError,
    history,
    isLoadingHistory,
    historyError,
    isSaving,
    saveError,
    isRemoving,
    removeError,
    get,
    loadHistory,
    save,
    remove,
    clearErrors,
  }
})
