import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import type { ApiError } from '@/api/http'
import * as findingsApi from '@/api/findings'
import type { Finding, FindingInput, Position } from '@shared/schemas/inspections'
import { SeveritySchema } from '@shared/schemas/severity'
import { useNotificationsStore } from './notifications'
import { attempt } from './record-list'
import { asApiError } from './report-failure'

const severityRank = new Map(SeveritySchema.options.map((s, i) => [s, i]))

/** Most serious first (the order of SeveritySchema), then in the order they were found. */
export function bySeverity(a: Finding, b: Finding): number {
  return (severityRank.get(a.severity) ?? 0) - (severityRank.get(b.severity) ?? 0) || a.createdAt.localeCompare(b.createdAt)
}

export interface PhotoUpload {
  findingId: string
  /** Share of the photos' bytes sent so far, 0 to 1. */
  progress: number
  isUploading: boolean
  /** Kept so "Try again" sends the same photos without choosing them again. */
  files: File[]
  error: ApiError | null
  /** The connection or the server failed, so the same photos may well go through next time; a refused photo will not. */
  retryable: boolean
}

export const useFindingsStore = defineStore('findings', () => {
  const notifications = useNotificationsStore()

  const jobId = ref<string | null>(null)
  const items = ref<Finding[]>([])
  const hasLoaded = ref(false)
  const isLoading = ref(false)
  const error = ref<ApiError | null>(null)
  const isSaving = ref(false)
  /** A 422 here carries the issues the finding form shows on its fields. */
  const saveError = ref<ApiError | null>(null)
  /** The finding being reviewed or deleted, or whose photo is being deleted. */
  const busyId = ref<string | null>(null)
  const actionError = ref<ApiError | null>(null)
  const upload = ref<PhotoUpload | null>(null)

  const sorted = computed(() => [...items.value].sort(bySeverity))

  function put(finding: Finding): Finding {
    const exists = items.value.some((f) => f.id === finding.id)
    items.value = exists ? items.value.map((f) => (f.id === finding.id ? finding : f)) : [...items.value, finding]
    return finding
  }

  async function load(id: string): Promise<void> {
    if (jobId.value !== id) {
      jobId.value = id
      items.value = []
      hasLoaded.value = false
    }
    await attempt(isLoading, error, async () => {
      items.value = await findingsApi.listFindings(id)
      hasLoaded.value = true
    })
  }

  /** The draft finding a reading on the inspection opened, once it is saved. */
  function forReading(inspectionId: string, checkCode: string, position: Position): Finding | null {
    return items.value.find((f) => f.inspectionId === inspectionId && f.checkCode === checkCode && f.position === position) ?? null
  }

  /** Adds a finding to the job when there is no id; returns it, or null with `saveError` set. */
  async function save(input: FindingInput, id?: string): Promise<Finding | null> {
    const job = jobId.value
    if (!job) return null
    let saved: Finding | null = null
    await attempt(isSaving, saveError, async () => {
      saved = put(id ? await findingsApi.updateFinding(id, input) : await findingsApi.createFinding(job, input))
    })
    return saved
  }

  async function review(id: string): Promise<boolean> {
    busyId.value = id
    const ok = await attempt(ref(false), actionError, async () => {
      put(await findingsApi.reviewFinding(id))
    })
    busyId.value = null
    return ok
  }

  async function remove(id: string): Promise<boolean> {
    busyId.value = id
    const ok = await attempt(ref(false), actionError, async () => {
      await findingsApi.deleteFinding(id)
      items.value = items.value.filter((f) => f.id !== id)
    })
    busyId.value = null
    return ok
  }

  async function removePhoto(findingId: string, photoId: string): Promise<boolean> {
    busyId.value = findingId
    const ok = await attempt(ref(false), actionError, async () => {
      await findingsApi.deletePhoto(photoId)
      items.value = items.value.map((f) => (f.id === findingId ? { ...f, photos: f.photos.filter((p) => p.id !== photoId) } : f))
    })
    busyId.value = null
    return ok
  }

  /**
   * Sends photos with progress. The uploader explains a refusal in place (too large, not a photo), so
   * it is not queued as a notification as well.
   */
  async function uploadPhotos(findingId: string, files: File[]): Promise<boolean> {
    const state: PhotoUpload = { findingId, progress: 0, isUploading: true, files, error: null, retryable: false }
    upload.value = state
    const tracked = () => (upload.value?.findingId === findingId ? upload.value : null)
    try {
      const photos = await findingsApi.uploadPhotos(findingId, files, {
        onProgress: (fraction) => {
          const u = tracked()
          if (u) u.progress = fraction
        },
      })
      items.value = items.value.map((f) => (f.id === findingId ? { ...f, photos: [...f.photos, ...photos] } : f))
      const u = tracked()
      if (u) {
        u.isUploading = false
        u.progress = 1
        u.files = []
      }
      notifications.push('success', photos.length === 1 ? 'Photo added.' : `${photos.length} photos added.`)
      return true
    } catch (cause) {
      const u = tracked()
      if (u) {
        u.isUploading = false
        u.error = asApiError(cause)
        u.retryable = u.error.status === 0 || u.error.status === 408 || u.error.status >= 500
      }
      return false
    }
  }

  function clearUpload(): void {
    if (!upload.value?.isUploading) upload.value = null
  }

  function clearErrors(): void {
    saveError.value = null
    actionError.value = null
  }

  return {
    jobId,
    items,
    sorted,
    hasLoaded,
    isLoading,
    error,
    isSaving,
    saveError,
    busyId,
    actionError,
    upload,
    load,
    forReading,
    save,
    review,
    remove,
    removePhoto,
    uploadPhotos,
    clearUpload,
    clearErrors,
  }
})
