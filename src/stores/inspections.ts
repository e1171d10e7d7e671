import { defineStore } from 'pinia'
import { computed, ref, watch } from 'vue'
import type { ApiError } from '@/api/http'
import * as inspectionsApi from '@/api/inspections'
import { ResultMismatchError, suggestSeverity } from '@shared/inspection/rules'
import {
  areaCodes,
  type AreaCode,
  type CheckDefinition,
  type Inspection,
  type Position,
  type RecordResult,
  type ResultValue,
  type SafetyCheck,
} from '@shared/schemas/inspections'
import type { Severity } from '@shared/schemas/severity'
import { useNotificationsStore } from './notifications'
import { asApiError, reportFailure } from './report-failure'

/**
 * Where the technician is: starting (nothing to carry on with), the safety step, the checks, the
 * summary before finishing, or a finished inspection.
 */
export type InspectionStage = 'start' | 'safety' | 'checks' | 'finish' | 'done'

/** How one reading stands: on the server, on its way, waiting to be tried again, or refused. */
export type ReadingState = 'saved' | 'saving' | 'retrying' | 'failed'

export interface QueuedReading {
  key: string
  inspectionId: string
  result: RecordResult
  state: 'waiting' | 'saving' | 'retrying' | 'failed'
  attempts: number
  /** Why the last try failed, in the server's or the connection's words. */
  message: string | null
}

export interface Reading {
  value: ResultValue
  severity: Severity | null
  detail: string
  state: ReadingState
  message: string | null
}

export const readingKey = (checkCode: string, position: Position) => `${checkCode}@${position}`

/** Connection trouble and a busy or restarting server pass; anything else will not change by trying again. */
function worthRetrying(error: ApiError): boolean {
  return error.status === 0 || error.status === 408 || error.status === 429 || error.status >= 500
}

/** 1 s, 2 s, 4 s … up to 30 s between tries: quick after a blip, gentle on a connection that is down. */
export const RETRY_BASE_MS = 1000
export const RETRY_MAX_MS = 30_000
const retryDelay = (attempts: number) => Math.min(RETRY_BASE_MS * 2 ** Math.max(0, attempts - 1), RETRY_MAX_MS)

/**
 * Readings not yet on the server survive a reload or the phone closing the tab (it often does while
 * the camera is open), so no tap is lost. Storage can be unavailable; then they live as long as the page.
 */
const QUEUE_KEY = 'tickover.inspection.unsaved-readings'

function readStoredQueue(): QueuedReading[] {
  try {
    const raw = localStorage.getItem(QUEUE_KEY)
    const parsed: unknown = raw ? JSON.parse(raw) : []
    return Array.isArray(parsed) ? (parsed as QueuedReading[]) : []
  } catch {
    return []
  }
}

function writeStoredQueue(entries: QueuedReading[]): void {
  try {
    if (entries.length) localStorage.setItem(QUEUE_KEY, JSON.stringify(entries))
    else localStorage.removeItem(QUEUE_KEY)
  } catch {
    // See QUEUE_KEY: the queue still works for as long as the page is open.
  }
}

function suggestionFor(check: CheckDefinition | undefined, value: ResultValue): { severity: Severity | null; detail: string } {
  if (!check) return { severity: null, detail: '' }
  try {
    return suggestSeverity(check, value)
  } catch (err) {
    // A reading that does not fit its check is refused by the server too; its message is shown then.
    if (err instanceof ResultMismatchError) return { severity: null, detail: '' }
    throw err
  }
}

export const useInspectionsStore = defineStore('inspections', () => {
  const notifications = useNotificationsStore()

  const jobId = ref<string | null>(null)
  const current = ref<Inspection | null>(null)
  /** Earlier, finished inspections of the job, newest first. */
  const finished = ref<Inspection[]>([])
  const stage = ref<InspectionStage>('start')
  const isLoading = ref(false)
  const error = ref<ApiError | null>(null)
  const isStarting = ref(false)
  /** A 422 on `templateId` here means the technician has to choose a template. */
  const startError = ref<ApiError | null>(null)
  const isSavingSafety = ref(false)
  const safetyError = ref<ApiError | null>(null)
  const isSavingNotes = ref(false)
  const notesError = ref<ApiError | null>(null)
  const isFinishing = ref(false)
  const finishError = ref<ApiError | null>(null)

  /**
   * Inspections whose safety step was confirmed on this visit. It is asked again after a reload: the
   * vehicle may have been lowered and raised since.
   */
  const confirmedSafety = ref(new Set<string>())

  const queue = ref<QueuedReading[]>(readStoredQueue())
  watch(queue, (entries) => writeStoredQueue(entries), { deep: true })

  let inFlight: QueuedReading | null = null
  let pumping = false
  /** Inspections whose readings wait because the server wants the safety step first. */
  const waitingForSafety = ref(new Set<string>())
  /** The session has ended: nothing is sent until the person has signed in again and reopens the screen. */
  const isPaused = ref(false)
  let wakeUp: (() => void) | null = null

  const checksByCode = computed(() => new Map((current.value?.definition.checks ?? []).map((c) => [c.code, c])))

  const queueOfCurrent = computed(() => queue.value.filter((e) => e.inspectionId === current.value?.id))

  /** What the screen shows for each check and position: the newest tap wins over what the server has. */
  const readings = computed(() => {
    const map = new Map<string, Reading>()
    for (const r of current.value?.results ?? []) {
      map.set(readingKey(r.checkCode, r.position), {
        value: r.value,
        severity: r.suggestedSeverity,
        detail: r.detail,
        state: 'saved',
        message: null,
      })
    }
    for (const e of queueOfCurrent.value) {
      const suggestion = suggestionFor(checksByCode.value.get(e.result.checkCode), e.result.value)
      const state: ReadingState = e.state === 'failed' ? 'failed' : e.state === 'retrying' ? 'retrying' : 'saving'
      map.set(e.key, { value: e.result.value, ...suggestion, state, message: e.message })
    }
    return map
  })

  /** Every check at every one of its positions, the unit progress is counted in. */
  const slots = computed(() =>
    (current.value?.definition.checks ?? []).flatMap((check) => check.positions.map((position) => ({ check, position }))),
  )

  const progress = computed(() => {
    const byArea = Object.fromEntries(areaCodes.map((a) => [a, { done: 0, total: 0 }])) as Record<AreaCode, { done: number; total: number }>
    let done = 0
    for (const { check, position } of slots.value) {
      const area = byArea[check.area]
      area.total++
      if (readings.value.has(readingKey(check.code, position))) {
        area.done++
        done++
      }
    }
    return { done, total: slots.value.length, byArea }
  })

  const unsavedCount = computed(() => queueOfCurrent.value.filter((e) => e.state !== 'failed').length)
  const failedCount = computed(() => queueOfCurrent.value.filter((e) => e.state === 'failed').length)
  const isRetrying = computed(() => queueOfCurrent.value.some((e) => e.state === 'retrying'))

  function show(inspection: Inspection): void {
    current.value = inspection
    if (inspection.status === 'finished') stage.value = 'done'
    else if (stage.value === 'start' || stage.value === 'done') stage.value = confirmedSafety.value.has(inspection.id) ? 'checks' : 'safety'
  }

  /** Opens the job's unfinished inspection, or starts one if the job has never been inspected. */
  async function open(id: string): Promise<void> {
    if (jobId.value !== id) {
      jobId.value = id
      current.value = null
      finished.value = []
      stage.value = 'start'
    }
    isLoading.value = true
    error.value = null
    startError.value = null
    isPaused.value = false
    try {
      const all = await inspectionsApi.listJobInspections(id)
      finished.value = all.filter((i) => i.status === 'finished')
      const open = all.find((i) => i.status !== 'finished')
      if (open) show(open)
      else if (all.length === 0) await start()
      else {
        current.value = finished.value[0] ?? null
        stage.value = 'done'
      }
    } catch (cause) {
      error.value = reportFailure(cause)
    } finally {
      isLoading.value = false
    }
    void pump()
  }

  async function start(templateId?: string): Promise<boolean> {
    if (!jobId.value) return false
    isStarting.value = true
    startError.value = null
    try {
      stage.value = 'start'
      show(await inspectionsApi.startInspection(jobId.value, templateId))
      return true
    } catch (cause) {
      startError.value = reportFailure(cause)
      return false
    } finally {
      isStarting.value = false
    }
  }

  async function saveSafety(safety: SafetyCheck): Promise<boolean> {
    const inspection = current.value
    if (!inspection) return false
    isSavingSafety.value = true
    safetyError.value = null
    try {
      const saved = await inspectionsApi.saveSafety(inspection.id, safety)
      confirmedSafety.value.add(saved.id)
      waitingForSafety.value.delete(saved.id)
      takeFrom(saved, ['safety', 'status'])
      stage.value = 'checks'
      void pump()
      return true
    } catch (cause) {
      safetyError.value = reportFailure(cause)
      return false
    } finally {
      isSavingSafety.value = false
    }
  }

  /**
   * Readings are sent one at a time, so their answers arrive in order; the answer to a notes or safety
   * call may have been taken before a reading saved meanwhile, so only its own part is used.
   */
  function takeFrom(answer: Inspection, fields: readonly ('notes' | 'safety' | 'status')[]): void {
    if (current.value?.id !== answer.id) return
    const next = { ...current.value }
    for (const field of fields) Object.assign(next, { [field]: answer[field] })
    current.value = next
  }

  /** Shows the reading at once and saves it in the background, in the order the readings were taken. */
  function record(checkCode: string, position: Position, value: ResultValue, note?: string): void {
    const inspection = current.value
    if (!inspection) return
    const key = readingKey(checkCode, position)
    const result: RecordResult = { checkCode, position, value, ...(note ? { note } : {}) }
    // A newer tap on the same check replaces one that has not been sent yet; one already on its way
    // is followed by the newer one, so the server ends with the last tap.
    const waiting = queue.value.find((e) => e.key === key && e.inspectionId === inspection.id && e !== inFlight)
    if (waiting) {
      waiting.result = result
      waiting.state = 'waiting'
      waiting.attempts = 0
      waiting.message = null
    } else {
      queue.value.push({ key, inspectionId: inspection.id, result, state: 'waiting', attempts: 0, message: null })
    }
    wake()
    void pump()
  }

  function wake(): void {
    wakeUp?.()
  }

  function pause(ms: number): Promise<void> {
    return new Promise((resolve) => {
      const timer = setTimeout(done, ms)
      function done(): void {
        clearTimeout(timer)
        wakeUp = null
        resolve()
      }
      wakeUp = done
    })
  }

  /** Sends queued readings one at a time, oldest first; a reading that fails on the connection is tried again before any later one. */
  async function pump(): Promise<void> {
    if (pumping) return
    pumping = true
    try {
      for (;;) {
        if (isPaused.value) return
        const entry = queue.value.find((e) => e.state !== 'failed' && !waitingForSafety.value.has(e.inspectionId))
        if (!entry) return
        if (entry.state === 'waiting') entry.state = 'saving'
        inFlight = entry
        try {
          const inspection = await inspectionsApi.recordResult(entry.inspectionId, entry.result)
          inFlight = null
          queue.value = queue.value.filter((e) => e !== entry)
          if (current.value?.id === inspection.id) current.value = inspection
        } catch (cause) {
          inFlight = null
          const failure = asApiError(cause)
          if (failure.code === 'safety_first') {
            entry.state = 'waiting'
            needsSafety(entry.inspectionId)
            return
          }
          if (failure.status === 401) {
            // The sign-in redirect has taken over; the reading waits for the person to come back.
            entry.state = 'retrying'
            entry.message = failure.message
            isPaused.value = true
            return
          }
          if (!worthRetrying(failure)) {
            entry.state = 'failed'
            entry.message = failure.message
            continue
          }
          entry.attempts++
          entry.state = 'retrying'
          entry.message = failure.message
          await pause(retryDelay(entry.attempts))
        }
      }
    } finally {
      pumping = false
    }
  }

  function needsSafety(inspectionId: string): void {
    waitingForSafety.value.add(inspectionId)
    confirmedSafety.value.delete(inspectionId)
    if (current.value?.id === inspectionId) stage.value = 'safety'
    notifications.push('info', 'Record the safety check first. Your readings are kept and will be saved straight after it.')
  }

  /** "Try now" on a reading waiting for the connection, or on one the server refused. */
  function retry(key?: string): void {
    for (const e of queue.value) {
      if (e.state === 'failed' && (key === undefined || e.key === key)) {
        e.state = 'waiting'
        e.attempts = 0
        e.message = null
      }
    }
    isPaused.value = false
    wake()
    void pump()
  }

  /** Drops a reading the server refused, leaving what the server already has. */
  function discard(key: string): void {
    queue.value = queue.value.filter((e) => !(e.key === key && e.state === 'failed'))
  }

  async function saveNotes(notes: string): Promise<boolean> {
    const inspection = current.value
    if (!inspection) return false
    isSavingNotes.value = true
    notesError.value = null
    try {
      const saved = await inspectionsApi.saveNotes(inspection.id, notes)
      takeFrom(saved, ['notes'])
      return true
    } catch (cause) {
      notesError.value = reportFailure(cause)
      return false
    } finally {
      isSavingNotes.value = false
    }
  }

  function goTo(next: 'checks' | 'finish'): void {
    if (current.value && current.value.status !== 'finished') stage.value = next
  }

  async function finish(): Promise<boolean> {
    const inspection = current.value
    if (!inspection || unsavedCount.value > 0 || failedCount.value > 0) return false
    isFinishing.value = true
    finishError.value = null
    try {
      const done = await inspectionsApi.finishInspection(inspection.id)
      current.value = done
      finished.value = [done, ...finished.value.filter((i) => i.id !== done.id)]
      stage.value = 'done'
      return true
    } catch (cause) {
      const failure = asApiError(cause)
      if (failure.code === 'safety_first') needsSafety(inspection.id)
      finishError.value = reportFailure(failure)
      return false
    } finally {
      isFinishing.value = false
    }
  }

  if (typeof window !== 'undefined') {
    // Back in coverage: try the waiting readings now rather than at the end of the current pause.
    window.addEventListener('online', () => {
      wake()
      void pump()
    })
  }

  return {
    jobId,
    current,
    finished,
    stage,
    isLoading,
    error,
    isStarting,
    startError,
    isSavingSafety,
    safetyError,
    isSavingNotes,
    notesError,
    isFinishing,
    finishError,
    queue,
    isPaused,
    waitingForSafety,
    readings,
    progress,
    unsavedCount,
    failedCount,
    isRetrying,
    open,
    start,
    saveSafety,
    record,
    retry,
    discard,
    saveNotes,
    goTo,
    finish,
  }
})
