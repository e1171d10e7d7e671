import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import type { ApiError } from '@/api/http'
import * as portalApi from '@/api/portal'
import { safeCalculateEstimate } from '@shared/estimate'
import type { Decision, EstimateResult } from '@shared/estimate/contract'
import { snapshotToEngineInput } from '@shared/schemas/estimates'
import type {
  ConfirmResponse,
  LinkRefusalCode,
  LinkRefusalDetails,
  PortalDeposit,
  PortalEstimate,
  PortalQuestion,
} from '@shared/schemas/portal'
import { useAuthStore } from './auth'
import { asApiError } from './report-failure'

/** How often the return page asks whether the deposit is paid, and for how long before saying calmly that it is taking a while. */
export const DEPOSIT_POLL_EVERY_MS = 1500
export const DEPOSIT_POLL_FOR_MS = 60_000

/** Why a link did not open, with what the server says can be offered next. */
export interface LinkRefusal {
  code: LinkRefusalCode
  message: string
  details: LinkRefusalDetails
}

export type OpenOutcome = { opened: true; estimateId: string } | { opened: false; refusal: LinkRefusal | null }

const linkCodes = new Set<string>(['link_invalid', 'link_expired', 'link_revoked', 'link_superseded'])

// Checked by hand, like the error body in http.ts: the details only steer which button to offer.
function linkDetails(details: unknown): LinkRefusalDetails {
  const d = (typeof details === 'object' && details !== null ? details : {}) as Record<string, unknown>
  return { newerVersion: d.newerVersion === true, renewable: d.renewable === true }
}

function latestVersionIn(details: unknown): number | null {
  const d = (typeof details === 'object' && details !== null ? details : {}) as Record<string, unknown>
  return typeof d.latestVersion === 'number' && Number.isInteger(d.latestVersion) ? d.latestVersion : null
}

/**
 * The provider sends a customer who cancels back to the estimate page, which cannot tell that
 * visit from any other; this tab remembers that it went to pay, so the page can say the payment
 * did not go through.
 */
const CHECKOUT_KEY = 'tickover.portal.checkout'

function rememberCheckout(estimateId: string): void {
  try {
    sessionStorage.setItem(CHECKOUT_KEY, estimateId)
  } catch {
    // Private browsing can refuse storage; the page then shows the deposit as simply due.
  }
}

function takeCheckout(estimateId: string): boolean {
  try {
    const started = sessionStorage.getItem(CHECKOUT_KEY) === estimateId
    if (started) sessionStorage.removeItem(CHECKOUT_KEY)
    return started
  } catch {
    return false
  }
}

/** One estimate as its customer reads, decides, confirms and pays for it. */
export const usePortalEstimateStore = defineStore('portal-estimate', () => {
  const estimate = ref<PortalEstimate | null>(null)
  const isLoading = ref(false)
  const error = ref<ApiError | null>(null)

  /** The last decisions and figures the server answered with: the truth. */
  const savedDecisions = ref<Record<string, Decision>>({})
  const savedResult = ref<EstimateResult | null>(null)
  /** Choices made on this page that the server has not answered yet. */
  const unsaved = ref<Record<string, Decision>>({})
  /** The server's words beside an item whose choice it refused (or could not save). */
  const itemProblems = ref<Record<string, string>>({})
  /** Set when a save found that the workshop has sent a newer version. */
  const newerVersion = ref<number | null>(null)
  /** Why deciding stopped while the page was open (confirmed elsewhere, withdrawn, past its date). */
  const closedMessage = ref<string | null>(null)

  const isAsking = ref(false)
  const askError = ref<ApiError | null>(null)
  const isConfirming = ref(false)
  const confirmError = ref<ApiError | null>(null)
  const confirmed = ref<ConfirmResponse | null>(null)
  const isPaying = ref(false)
  const payError = ref<ApiError | null>(null)
  /** True once, after the customer came back from the payment page without paying. */
  const paymentNotTaken = ref(false)

  const isOpening = ref(false)
  const isRenewing = ref(false)
  const renewMessage = ref<string | null>(null)
  const renewError = ref<ApiError | null>(null)

  const decisions = computed<Record<string, Decision>>(() => ({ ...savedDecisions.value, ...unsaved.value }))
  const isSaving = computed(() => Object.keys(unsaved.value).length > 0)

  /**
   * While a choice is on its way, the figures come from the engine here, so the total moves the
   * moment the customer taps; the server's answer then replaces them. A choice the engine refuses
   * (an item without the item it needs) keeps the last saved figures until the server explains.
   */
  const result = computed<EstimateResult | null>(() => {
    const shown = estimate.value
    if (!shown || !isSaving.value) return savedResult.value
    const priced = safeCalculateEstimate(snapshotToEngineInput(shown.snapshot, decisions.value))
    return priced.success ? priced.data : savedResult.value
  })

  const canDecide = computed(() => Boolean(estimate.value?.canDecide) && newerVersion.value === null && closedMessage.value === null)
  const undecidedCount = computed(
    () => (estimate.value?.snapshot.items ?? []).filter((i) => (decisions.value[i.id] ?? 'pending') === 'pending').length,
  )
  const questions = computed<PortalQuestion[]>(() => estimate.value?.questions ?? [])

  function show(loaded: PortalEstimate): void {
    estimate.value = loaded
    savedDecisions.value = loaded.decisions
    savedResult.value = loaded.result
    unsaved.value = {}
    itemProblems.value = {}
    newerVersion.value = null
    closedMessage.value = null
  }

  async function load(id: string, version?: number): Promise<void> {
    if (estimate.value?.id !== id) {
      estimate.value = null
      confirmed.value = null
    }
    isLoading.value = true
    error.value = null
    try {
      show(await portalApi.getMyEstimate(id, version))
      const cameBackFromPaying = takeCheckout(id)
      paymentNotTaken.value = cameBackFromPaying && estimate.value?.deposit.status === 'awaiting_payment'
    } catch (cause) {
      // The page explains every failure itself, with a way to try again.
      error.value = asApiError(cause)
    } finally {
      isLoading.value = false
    }
  }

  function without(record: Record<string, Decision>, key: string): Record<string, Decision> {
    const { [key]: _dropped, ...rest } = record
    return rest
  }

  // Choices are sent one after another: an item and the item it needs, tapped quickly, must
  // reach the server in the order they were made or the second would be refused.
  let queue: Promise<void> = Promise.resolve()
  let choiceCount = 0
  const latestChoice = new Map<string, number>()

  function decide(itemId: string, decision: Decision): Promise<void> {
    const shown = estimate.value
    if (!shown || !canDecide.value) return Promise.resolve()
    const { [itemId]: _cleared, ...otherProblems } = itemProblems.value
    itemProblems.value = otherProblems
    unsaved.value = { ...unsaved.value, [itemId]: decision }
    const choice = ++choiceCount
    latestChoice.set(itemId, choice)
    const saved = queue.then(() => save(shown, itemId, decision, choice))
    // A bug in one save must not stop the ones after it; the caller still sees it.
    queue = saved.catch(() => undefined)
    return saved
  }

  async function save(shown: PortalEstimate, itemId: string, decision: Decision, choice: number): Promise<void> {
    // A later tap on the same item replaces this one before it was sent.
    if (latestChoice.get(itemId) !== choice) return
    if (estimate.value !== shown || !canDecide.value) {
      unsaved.value = without(unsaved.value, itemId)
      return
    }
    const settle = () => {
      if (latestChoice.get(itemId) === choice) unsaved.value = without(unsaved.value, itemId)
    }
    try {
      const answer = await portalApi.putDecision(shown.id, itemId, { version: shown.version, decision })
      savedDecisions.value = answer.decisions
      savedResult.value = answer.result
      settle()
    } catch (cause) {
      const failure = asApiError(cause)
      settle()
      if (failure.status === 409 && failure.code === 'superseded') {
        newerVersion.value = latestVersionIn(failure.details) ?? shown.latestVersion + 1
        unsaved.value = {}
      } else if (failure.status === 409 || failure.status === 410) {
        closedMessage.value = failure.message
        unsaved.value = {}
      } else if (failure.status !== 401) {
        itemProblems.value = { ...itemProblems.value, [itemId]: failure.message }
      }
    }
  }

  async function ask(itemId: string, question: string): Promise<boolean> {
    const shown = estimate.value
    if (!shown) return false
    isAsking.value = true
    askError.value = null
    try {
      const asked = await portalApi.askQuestion(shown.id, { itemId, question })
      if (estimate.value === shown) shown.questions = [...shown.questions, asked]
      return true
    } catch (cause) {
      askError.value = asApiError(cause)
      return false
    } finally {
      isAsking.value = false
    }
  }

  async function confirm(startWithinCancellationPeriod: boolean): Promise<ConfirmResponse | null> {
    isConfirming.value = true
    confirmError.value = null
    // Every choice must have reached the server first, or it would confirm without the last one.
    await queue
    const shown = estimate.value
    if (!shown) {
      isConfirming.value = false
      return null
    }
    try {
      const answer = await portalApi.confirmEstimate(shown.id, {
        version: shown.version,
        hash: shown.hash,
        consents: { startWithinCancellationPeriod, cancellationInformationShown: true },
      })
      confirmed.value = answer
      await load(shown.id)
      return answer
    } catch (cause) {
      const failure = asApiError(cause)
      if (failure.status === 409 && failure.code === 'superseded')
        newerVersion.value = latestVersionIn(failure.details) ?? shown.latestVersion + 1
      else confirmError.value = failure
      return null
    } finally {
      isConfirming.value = false
    }
  }

  /** Sends the browser to the payment page; resolves only when that could not start. */
  async function pay(): Promise<void> {
    const shown = estimate.value
    if (!shown) return
    isPaying.value = true
    payError.value = null
    paymentNotTaken.value = false
    try {
      const { url } = await portalApi.startDepositCheckout(shown.id)
      rememberCheckout(shown.id)
      window.location.assign(url)
    } catch (cause) {
      const failure = asApiError(cause)
      payError.value = failure
      // Already paid (in another tab, say): show what is true now.
      if (failure.status === 409) await load(shown.id)
    } finally {
      isPaying.value = false
    }
  }

  /**
   * The provider sent the customer to the return page, so the payment went through on its side
   * even while the server has not heard yet: the estimate page must not say it failed.
   */
  function returnedFromPayment(id: string): void {
    takeCheckout(id)
    paymentNotTaken.value = false
  }

  /** For the return page's polling: null when this check failed (the next one may not). */
  async function checkDeposit(id: string): Promise<PortalDeposit | null> {
    try {
      const deposit = await portalApi.getDeposit(id)
      if (estimate.value?.id === id) estimate.value.deposit = deposit
      return deposit
    } catch (cause) {
      const failure = asApiError(cause)
      // A dropped connection or a busy server is worth another try; anything else is shown.
      if (failure.status !== 0 && failure.status < 500) error.value = failure
      return null
    }
  }

  /** Opens an estimate link: signs its customer in, or says why it does not open. */
  async function openLink(token: string): Promise<OpenOutcome> {
    isOpening.value = true
    try {
      const opened = await portalApi.openEstimateLink(token)
      useAuthStore().$patch({ user: opened.user, hasLoaded: true })
      return { opened: true, estimateId: opened.estimateId }
    } catch (cause) {
      const failure = asApiError(cause)
      if (linkCodes.has(failure.code)) {
        return {
          opened: false,
          refusal: { code: failure.code as LinkRefusalCode, message: failure.message, details: linkDetails(failure.details) },
        }
      }
      // Too short or too long to be one of ours: the same advice as a link we do not recognise.
      if (failure.status === 422)
        return {
          opened: false,
          refusal: { code: 'link_invalid', message: failure.message, details: { newerVersion: false, renewable: false } },
        }
      error.value = failure
      return { opened: false, refusal: null }
    } finally {
      isOpening.value = false
    }
  }

  // Addresses the browser loads itself (the PDF, photos), so pages do not reach into the API module.
  const pdfUrl = (id: string, version?: number) => portalApi.pdfUrl(id, version)
  const photoUrl = (id: string, photoId: string, size: 'full' | 'thumb') => portalApi.photoUrl(id, photoId, size)

  async function renewLink(token: string): Promise<void> {
    isRenewing.value = true
    renewError.value = null
    try {
      renewMessage.value = (await portalApi.renewEstimateLink(token)).message
    } catch (cause) {
      renewError.value = asApiError(cause)
    } finally {
      isRenewing.value = false
    }
  }

  return {
    pdfUrl,
    photoUrl,
    estimate,
    isLoading,
    error,
    decisions,
    result,
    isSaving,
    unsaved,
    itemProblems,
    newerVersion,
    closedMessage,
    canDecide,
    undecidedCount,
    questions,
    isAsking,
    askError,
    isConfirming,
    confirmError,
    confirmed,
    isPaying,
    payError,
    paymentNotTaken,
    isOpening,
    isRenewing,
    renewMessage,
    renewError,
    load,
    decide,
    ask,
    confirm,
    pay,
    returnedFromPayment,
    checkDeposit,
    openLink,
    renewLink,
  }
})
