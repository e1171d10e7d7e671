import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import * as catalogueApi from '@/api/catalogue'
import * as estimatesApi from '@/api/estimates'
import * as findingsApi from '@/api/findings'
import type { ApiError } from '@/api/http'
import { type ItemRef, labourLineFrom, mergeAccessSteps, moved, placeIssues } from '@/composables/estimate-draft'
import { safeCalculateEstimate } from '@shared/estimate'
import type { AccessStep, LabourOperation, Part } from '@shared/schemas/catalogue'
import {
  type DraftItem,
  type DraftLine,
  type EstimateDetail,
  type EstimateDraft,
  EstimateDraftSchema,
  type EstimateStatus,
  type EstimateSummary,
  draftToEngineInput,
} from '@shared/schemas/estimates'
import type { LiveEvent } from '@shared/schemas/live'
import { useLiveStore } from './live'
import { useNotificationsStore } from './notifications'
import { useRecordList } from './record-list'
import { asApiError, reportFailure } from './report-failure'

/** Long enough that a pause between words does not save half a word; short enough that leaving the desk loses nothing. */
export const AUTOSAVE_DELAY_MS = 800
/** A decision often arrives with a confirmation and an e-mail status in the same second: one fetch for the burst. */
export const LIVE_REFRESH_DELAY_MS = 300

export const STALE_MESSAGE = 'Someone else changed this estimate — reload to see their changes'

/** Live events from the customer's side: worth a toast as well while the advisor has that estimate open. */
const customerEvents = new Set<LiveEvent['type']>([
  'estimate.opened',
  'estimate.decision',
  'estimate.confirmed',
  'estimate.deposit_paid',
  'estimate.question',
])

/**
 * The one place the estimate screens hear about changes as they happen. `caughtUp` runs after the
 * live stream was down, since events sent meanwhile are not replayed. Returns the function that stops listening.
 */
export function listenForEstimateEvents(handler: (event: LiveEvent) => void, caughtUp: () => void): () => void {
  const live = useLiveStore()
  const stops = [live.on('*', handler), live.on('reconnected', caughtUp)]
  return () => {
    for (const stop of stops) stop()
  }
}

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

/**
 * - `saved`: the server has every change
 * - `pending`: changed here, saving after a pause in typing
 * - `saving`: on its way
 * - `failed`: the last save did not go through; the next change or "Retry" tries again
 * - `invalid`: something on the estimate must be fixed before it can be saved
 * - `stale`: someone else saved in between; only reloading gets out of it
 */
export type SaveState = 'saved' | 'pending' | 'saving' | 'failed' | 'invalid' | 'stale'

export type EstimateAction = 'send' | 'withdraw' | 'findings' | 'refund' | 'resend'

export interface RemovedItem {
  item: DraftItem
  index: number
  /** Items that required the removed one, so undoing puts that back too. */
  requiredBy: string[]
}

type Settings = Pick<EstimateDraft, 'taxMode' | 'taxRounding' | 'discount' | 'deposit' | 'expiresOn' | 'message'>

const copy = <T>(value: T): T => JSON.parse(JSON.stringify(value)) as T

/**
 * The estimate the builder shows: the server's copy, a local copy of the draft that the advisor
 * edits, and saving it shortly after typing stops. A save names the revision the local copy
 * started from, so two people editing at once cannot overwrite each other unseen.
 */
export const useEstimateStore = defineStore('estimate', () => {
  const notifications = useNotificationsStore()

  const detail = ref<EstimateDetail | null>(null)
  const draft = ref<EstimateDraft | null>(null)
  /** The server revision the local draft started from. */
  const baseRevision = ref(0)
  const dirty = ref(false)
  const saveState = ref<SaveState>('saved')
  const saveError = ref<ApiError | null>(null)
  const isLoading = ref(false)
  const loadError = ref<ApiError | null>(null)
  const busy = ref<EstimateAction | null>(null)
  const resendingId = ref<string | null>(null)
  /** What a field holds that cannot go on the draft yet ("12.5x"), by `${lineId}.${field}`. */
  const fieldProblems = ref<Record<string, string>>({})
  /** What the server said about the last change it made itself ("part X is not in your parts list"), until dismissed. */
  const notices = ref<string[]>([])

  const accessStepGraph = ref<AccessStep[]>([])
  let graphLoaded = false
  const partMatches = ref<Part[]>([])
  const isSearchingParts = ref(false)

  let edits = 0
  let saveTimer: ReturnType<typeof setTimeout> | undefined
  let refreshTimer: ReturnType<typeof setTimeout> | undefined
  let inFlight: Promise<boolean> | null = null
  let loadTicket = 0

  const currency = computed(() => detail.value?.currency ?? 'GBP')
  /**
   * The engine's figures for the draft as it stands on this screen. Every item counts as approved,
   * so each line's shared-access note reads as it will when the customer takes the lot; the
   * engine leaves pending items out of what later items can share.
   */
  const priced = computed(() => {
    const d = draft.value
    if (!d) return null
    const everyItem = Object.fromEntries(d.items.map((i) => [i.id, 'approved' as const]))
    return safeCalculateEstimate(draftToEngineInput(d, currency.value, everyItem))
  })
  const issues = computed(() => {
    if (!draft.value) return []
    const contract = EstimateDraftSchema.safeParse(draft.value)
    return [...(contract.success ? [] : contract.error.issues), ...(priced.value && !priced.value.success ? priced.value.issues : [])]
  })
  const placed = computed(() => placeIssues(issues.value))
  const hasProblems = computed(() => issues.value.length > 0 || Object.keys(fieldProblems.value).length > 0)
  const itemRefs = computed<ItemRef[]>(() =>
    (draft.value?.items ?? []).map((item, i) => ({ id: item.id, number: i + 1, title: item.title })),
  )
  const isWithdrawn = computed(() => detail.value?.status === 'withdrawn')
  /** Edits wait while an action rewrites the draft on the server, so neither side's change is lost. */
  const isLocked = computed(() => busy.value === 'send' || busy.value === 'findings' || busy.value === 'withdraw')

  function reset(): void {
    clearTimeout(saveTimer)
    clearTimeout(refreshTimer)
    detail.value = null
    draft.value = null
    dirty.value = false
    saveState.value = 'saved'
    saveError.value = null
    fieldProblems.value = {}
    notices.value = []
    edits = 0
  }

  /** Takes the server's copy; the local draft too unless it holds changes the server has not had. */
  function adopt(fresh: EstimateDetail): void {
    const known = detail.value
    // An older answer that overtook a newer one must not roll the page back.
    if (known && known.id === fresh.id && fresh.revision < known.revision) return
    detail.value = fresh
    if (fresh.notices.length > 0) notices.value = fresh.notices
    if (dirty.value || inFlight) {
      if (!inFlight && fresh.revision > baseRevision.value && saveState.value !== 'stale') {
        saveState.value = 'stale'
        notifications.push('error', STALE_MESSAGE)
      }
      return
    }
    draft.value = copy(fresh.draft)
    baseRevision.value = fresh.revision
    if (saveState.value !== 'stale') saveState.value = 'saved'
  }

  /** An estimate the server has just answered with elsewhere (a new one from a job), so its page opens without waiting. */
  function take(fresh: EstimateDetail): void {
    if (detail.value?.id !== fresh.id) reset()
    adopt(fresh)
  }

  function dismissNotices(): void {
    notices.value = []
  }

  async function load(id: string): Promise<void> {
    const ticket = ++loadTicket
    if (detail.value?.id !== id) reset()
    isLoading.value = true
    loadError.value = null
    try {
      const fresh = await estimatesApi.getEstimate(id)
      if (ticket !== loadTicket) return
      adopt(fresh)
    } catch (cause) {
      if (ticket !== loadTicket) return
      // The page says "We can't find that estimate" itself.
      const failure = asApiError(cause)
      loadError.value = failure.status === 404 ? failure : reportFailure(failure)
    } finally {
      if (ticket === loadTicket) isLoading.value = false
    }
  }

  /** Drops the local changes and shows what the server has now. */
  async function reload(): Promise<void> {
    const id = detail.value?.id
    if (!id) return
    clearTimeout(saveTimer)
    dirty.value = false
    fieldProblems.value = {}
    saveState.value = 'saved'
    saveError.value = null
    detail.value = null
    await load(id)
  }

  /** After a live event: fetch once the burst is over, keeping the local draft if it has unsaved changes. */
  function refreshSoon(): void {
    clearTimeout(refreshTimer)
    refreshTimer = setTimeout(() => void refresh(), LIVE_REFRESH_DELAY_MS)
  }

  async function refresh(): Promise<void> {
    const id = detail.value?.id
    if (!id) return
    try {
      const fresh = await estimatesApi.getEstimate(id)
      if (detail.value?.id === id) adopt(fresh)
    } catch (cause) {
      reportFailure(cause)
    }
  }

  function onLiveEvent(event: LiveEvent): void {
    if (!detail.value || event.estimateId !== detail.value.id) return
    if (event.summary && customerEvents.has(event.type)) notifications.push('info', event.summary)
    refreshSoon()
  }

  // ---------------------------------------------------------------------------------------------
  // Saving

  function schedule(): void {
    clearTimeout(saveTimer)
    if (saveState.value === 'stale') return
    saveState.value = 'pending'
    saveTimer = setTimeout(() => void save(), AUTOSAVE_DELAY_MS)
  }

  function failed(cause: unknown): ApiError {
    const failure = asApiError(cause)
    saveError.value = failure
    if (failure.status === 409 && failure.code === 'stale_revision') {
      saveState.value = 'stale'
      notifications.push('error', STALE_MESSAGE)
    } else {
      notifications.push('error', failure.message)
    }
    return failure
  }

  /** Saves now what is waiting; true when the server has every change. */
  async function save(): Promise<boolean> {
    clearTimeout(saveTimer)
    if (inFlight) {
      await inFlight
      return save()
    }
    const current = detail.value
    if (!current || !draft.value || !dirty.value) return true
    if (saveState.value === 'stale') return false
    if (hasProblems.value) {
      saveState.value = 'invalid'
      return false
    }
    const sentEdits = edits
    const body = copy(draft.value)
    saveState.value = 'saving'
    saveError.value = null
    inFlight = (async () => {
      try {
        const saved = await estimatesApi.saveDraft(current.id, baseRevision.value, body)
        if (detail.value?.id !== saved.id) return false
        detail.value = saved
        baseRevision.value = saved.revision
        if (edits === sentEdits) {
          dirty.value = false
          saveState.value = 'saved'
        } else {
          schedule()
        }
        return true
      } catch (cause) {
        const failure = failed(cause)
        if (failure.status === 409 && failure.code === 'withdrawn') {
          saveState.value = 'failed'
          void refresh()
        } else if (saveState.value !== 'stale') {
          saveState.value = 'failed'
        }
        return false
      } finally {
        inFlight = null
      }
    })()
    return inFlight
  }

  /** Saves at once whatever is waiting, e.g. on leaving the page. */
  const flush = () => save()

  function change(mutate: (d: EstimateDraft) => void): void {
    if (!draft.value || isLocked.value) return
    mutate(draft.value)
    edits++
    dirty.value = true
    schedule()
  }

  function setFieldProblem(key: string, message: string | null): void {
    const had = key in fieldProblems.value
    if (message) {
      fieldProblems.value = { ...fieldProblems.value, [key]: message }
      if (dirty.value && saveState.value === 'pending') saveState.value = 'invalid'
      return
    }
    if (!had) return
    const { [key]: _cleared, ...rest } = fieldProblems.value
    fieldProblems.value = rest
    if (dirty.value && saveState.value === 'invalid') schedule()
  }

  function clearProblemsOf(prefix: string): void {
    const rest = Object.fromEntries(Object.entries(fieldProblems.value).filter(([key]) => !key.startsWith(`${prefix}.`)))
    if (Object.keys(rest).length !== Object.keys(fieldProblems.value).length) fieldProblems.value = rest
  }

  // ---------------------------------------------------------------------------------------------
  // Editing the draft

  const itemIndex = (d: EstimateDraft, itemId: string) => d.items.findIndex((i) => i.id === itemId)

  function updateItem(itemId: string, patch: Partial<Omit<DraftItem, 'id' | 'lines'>>): void {
    change((d) => {
      const item = d.items[itemIndex(d, itemId)]
      if (item) Object.assign(item, patch)
    })
  }

  function moveItem(itemId: string, delta: number): void {
    change((d) => {
      d.items = moved(d.items, itemIndex(d, itemId), delta)
    })
  }

  function addItem(item: DraftItem): void {
    change((d) => {
      d.items.push(item)
    })
  }

  function removeItem(itemId: string): RemovedItem | null {
    let removed: RemovedItem | null = null
    change((d) => {
      const index = itemIndex(d, itemId)
      const item = d.items[index]
      if (!item) return
      const requiredBy = d.items.filter((i) => i.requires.includes(itemId)).map((i) => i.id)
      for (const other of d.items) other.requires = other.requires.filter((r) => r !== itemId)
      d.items.splice(index, 1)
      for (const line of item.lines) clearProblemsOf(line.id)
      removed = { item, index, requiredBy }
    })
    return removed
  }

  function restoreItem(removed: RemovedItem): void {
    change((d) => {
      if (d.items.some((i) => i.id === removed.item.id)) return
      d.items.splice(Math.min(removed.index, d.items.length), 0, removed.item)
      for (const other of d.items) {
        if (removed.requiredBy.includes(other.id) && !other.requires.includes(removed.item.id)) other.requires.push(removed.item.id)
      }
    })
  }

  function addLine(itemId: string, line: DraftLine): void {
    change((d) => {
      d.items[itemIndex(d, itemId)]?.lines.push(line)
    })
  }

  function updateLine(itemId: string, line: DraftLine): void {
    change((d) => {
      const item = d.items[itemIndex(d, itemId)]
      if (!item) return
      item.lines = item.lines.map((l) => (l.id === line.id ? line : l))
    })
  }

  function removeLine(itemId: string, lineId: string): void {
    clearProblemsOf(lineId)
    change((d) => {
      const item = d.items[itemIndex(d, itemId)]
      if (item) item.lines = item.lines.filter((l) => l.id !== lineId)
    })
  }

  /** A labour line from the labour-time table, with its access steps (and what they include) on the draft. */
  function addLabour(itemId: string, op: LabourOperation, taxRate: string): void {
    change((d) => {
      const item = d.items[itemIndex(d, itemId)]
      if (!item) return
      item.lines.push(labourLineFrom(op, taxRate))
      d.accessSteps = mergeAccessSteps(d.accessSteps, op.accessSteps, accessStepGraph.value)
    })
  }

  function updateSettings(patch: Partial<Settings>): void {
    change((d) => {
      Object.assign(d, patch)
    })
  }

  // ---------------------------------------------------------------------------------------------
  // Look-ups for the builder

  /** The workshop's access steps, so a step an operation's steps include can go on the draft too. */
  async function loadAccessStepGraph(): Promise<void> {
    if (graphLoaded) return
    try {
      accessStepGraph.value = (await catalogueApi.listAccessSteps()).items
      graphLoaded = true
    } catch (cause) {
      reportFailure(cause)
    }
  }

  async function searchParts(q: string): Promise<void> {
    isSearchingParts.value = true
    try {
      partMatches.value = (await catalogueApi.searchParts({ q: q.trim() || undefined, page: 1, pageSize: 10 })).items
    } catch (cause) {
      reportFailure(cause)
    } finally {
      isSearchingParts.value = false
    }
  }

  // ---------------------------------------------------------------------------------------------
  // Actions on the server

  async function act(kind: EstimateAction, call: (id: string) => Promise<EstimateDetail | null>): Promise<boolean> {
    const id = detail.value?.id
    if (!id) return false
    busy.value = kind
    try {
      const fresh = await call(id)
      if (fresh && detail.value?.id === fresh.id) adopt(fresh)
      return true
    } catch (cause) {
      failed(cause)
      return false
    } finally {
      busy.value = null
    }
  }

  /** Sends the draft as a new version once every change is saved. */
  async function send(): Promise<boolean> {
    if (!(await save())) return false
    const ok = await act('send', (id) => estimatesApi.sendEstimate(id, baseRevision.value))
    if (ok && detail.value) {
      const to = detail.value.customer.email
      notifications.push('success', to ? `Sent to ${to}.` : 'Sent.')
    }
    return ok
  }

  async function addFindings(findingIds: string[]): Promise<boolean> {
    if (findingIds.length === 0) return true
    if (!(await save())) return false
    const ok = await act('findings', (id) => estimatesApi.addFindings(id, baseRevision.value, findingIds))
    if (ok)
      notifications.push(
        'success',
        findingIds.length === 1 ? 'Item added from the finding.' : `${findingIds.length} items added from the findings.`,
      )
    return ok
  }

  async function withdraw(): Promise<boolean> {
    // Changes typed just before are kept on record if they can be; withdrawing goes ahead either way.
    await save()
    clearTimeout(saveTimer)
    const ok = await act('withdraw', (id) => estimatesApi.withdrawEstimate(id))
    if (ok) notifications.push('success', 'Estimate withdrawn. The customer’s link no longer works.')
    return ok
  }

  async function resend(emailId: string): Promise<boolean> {
    resendingId.value = emailId
    const ok = await act('resend', async (id) => {
      await estimatesApi.resendEmail(id, emailId)
      return estimatesApi.getEstimate(id)
    })
    resendingId.value = null
    if (ok) notifications.push('success', 'The e-mail is on its way again.')
    return ok
  }

  async function refundDeposit(): Promise<boolean> {
    const ok = await act('refund', async (id) => {
      await estimatesApi.refundDeposit(id)
      return estimatesApi.getEstimate(id)
    })
    if (ok) notifications.push('success', 'Deposit refunded.')
    return ok
  }

  return {
    detail,
    draft,
    baseRevision,
    dirty,
    saveState,
    saveError,
    isLoading,
    loadError,
    busy,
    resendingId,
    fieldProblems,
    notices,
    accessStepGraph,
    partMatches,
    isSearchingParts,
    currency,
    priced,
    issues,
    placed,
    hasProblems,
    itemRefs,
    isWithdrawn,
    isLocked,
    take,
    dismissNotices,
    load,
    reload,
    refresh,
    refreshSoon,
    onLiveEvent,
    save,
    flush,
    setFieldProblem,
    updateItem,
    moveItem,
    addItem,
    removeItem,
    restoreItem,
    addLine,
    updateLine,
    removeLine,
    addLabour,
    updateSettings,
    loadAccessStepGraph,
    searchParts,
    send,
    addFindings,
    withdraw,
    resend,
    refundDeposit,
    pdfUrl: estimatesApi.versionPdfUrl,
  }
})
