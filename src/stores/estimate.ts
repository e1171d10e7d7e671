import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import * as catalogueApi from '@/api/catalogue'
import * as estimatesApi from '@/api/estimates'
import type { ApiError } from '@/api/http'
import { useAutosave } from '@/composables/autosave'
import { type ItemRef, placeIssues } from '@/composables/estimate-draft'
import { useDraftEdits } from '@/composables/estimate-edits'
import { safeCalculateEstimate } from '@shared/estimate'
import type { AccessStep, Part } from '@shared/schemas/catalogue'
import { type EstimateDetail, type EstimateDraft, EstimateDraftSchema, draftToEngineInput } from '@shared/schemas/estimates'
import type { LiveEvent } from '@shared/schemas/live'
import { LIVE_REFRESH_DELAY_MS } from './estimate-live'
import { useNotificationsStore } from './notifications'
import { asApiError, reportFailure } from './report-failure'

/** Long enough that a pause between words does not save half a word; short enough that leaving the desk loses nothing. */
export const AUTOSAVE_DELAY_MS = 800

export const STALE_MESSAGE = 'Someone else changed this estimate — reload to see their changes'

/** Live events from the customer's side: worth a toast as well while the advisor has that estimate open. */
const customerEvents = new Set<LiveEvent['type']>([
  'estimate.opened',
  'estimate.decision',
  'estimate.confirmed',
  'estimate.deposit_paid',
  'estimate.question',
])

export type EstimateAction = 'send' | 'withdraw' | 'findings' | 'refund' | 'resend'

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
  const saveError = ref<ApiError | null>(null)
  const isLoading = ref(false)
  const loadError = ref<ApiError | null>(null)
  const busy = ref<EstimateAction | null>(null)
  const resendingId = ref<string | null>(null)
  /** What the server said about the last change it made itself ("part X is not in your parts list"), until dismissed. */
  const notices = ref<string[]>([])

  const accessStepGraph = ref<AccessStep[]>([])
  let graphLoaded = false
  const partMatches = ref<Part[]>([])
  const isSearchingParts = ref(false)

  let refreshTimer: ReturnType<typeof setTimeout> | undefined
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
  const autosave = useAutosave({
    delayMs: AUTOSAVE_DELAY_MS,
    blocked: () => issues.value.length > 0,
    snapshot: () => (detail.value && draft.value ? { id: detail.value.id, draft: copy(draft.value) } : null),
    // The save names the revision the local draft started from.
    write: (local) => {
      saveError.value = null
      return estimatesApi.saveDraft(local.id, baseRevision.value, local.draft)
    },
    written: (saved) => {
      if (detail.value?.id !== saved.id) return false
      detail.value = saved
      baseRevision.value = saved.revision
      return true
    },
    failed: (cause) => {
      const failure = failed(cause)
      if (failure.status === 409 && failure.code === 'withdrawn') void refresh()
    },
  })
  const { dirty, saveState } = autosave
  const itemRefs = computed<ItemRef[]>(() =>
    (draft.value?.items ?? []).map((item, i) => ({ id: item.id, number: i + 1, title: item.title })),
  )
  const isWithdrawn = computed(() => detail.value?.status === 'withdrawn')
  /** Edits wait while an action rewrites the draft on the server, so neither side's change is lost. */
  const isLocked = computed(() => busy.value === 'send' || busy.value === 'findings' || busy.value === 'withdraw')

  function reset(): void {
    clearTimeout(refreshTimer)
    autosave.discard()
    detail.value = null
    draft.value = null
    saveError.value = null
    notices.value = []
  }

  /** Takes the server's copy; the local draft too unless it holds changes the server has not had. */
  function adopt(fresh: EstimateDetail): void {
    const known = detail.value
    // An older answer that overtook a newer one must not roll the page back.
    if (known && known.id === fresh.id && fresh.revision < known.revision) return
    detail.value = fresh
    if (fresh.notices.length > 0) notices.value = fresh.notices
    if (dirty.value || autosave.isWriting()) {
      if (!autosave.isWriting() && fresh.revision > baseRevision.value && saveState.value !== 'stale') {
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
    autosave.discard()
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

  /** Saves at once whatever is waiting, e.g. on leaving the page. */
  const flush = () => autosave.save()

  function change(mutate: (d: EstimateDraft) => void): void {
    if (!draft.value || isLocked.value) return
    mutate(draft.value)
    autosave.changed()
  }

  // ---------------------------------------------------------------------------------------------
  // Editing the draft

  const edits = useDraftEdits(change, { lineGone: autosave.clearProblemsOf, accessSteps: () => accessStepGraph.value })

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
    if (!(await autosave.save())) return false
    const ok = await act('send', (id) => estimatesApi.sendEstimate(id, baseRevision.value))
    if (ok && detail.value) {
      const to = detail.value.customer.email
      notifications.push('success', to ? `Sent to ${to}.` : 'Sent.')
    }
    return ok
  }

  async function addFindings(findingIds: string[]): Promise<boolean> {
    if (findingIds.length === 0) return true
    if (!(await autosave.save())) return false
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
    await autosave.save()
    autosave.cancel()
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
    fieldProblems: autosave.fieldProblems,
    notices,
    accessStepGraph,
    partMatches,
    isSearchingParts,
    currency,
    priced,
    issues,
    placed,
    hasProblems: autosave.hasProblems,
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
    save: autosave.save,
    flush,
    setFieldProblem: autosave.setFieldProblem,
    ...edits,
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
