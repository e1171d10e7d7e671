import { defineStore } from 'pinia'
import { ref } from 'vue'
import { API_BASE } from '@/api/http'
import { type LiveEvent, LiveEventSchema } from '@shared/schemas/live'

export type LiveEventType = LiveEvent['type']
export type LiveHandler = (event: LiveEvent) => void

const LIVE_URL = `${API_BASE}/live`
const liveTypes = LiveEventSchema.shape.type.options
/** The server sends this after its own database listener came back: events may have been missed. */
const RESYNC_EVENT = 'resync'
/** EventSource.CLOSED, spelled out so a browser without EventSource cannot break this module. */
const CLOSED = 2

/** Waits before opening the stream again after the browser gave up on it (a refusal or a 5xx). */
export const FIRST_RETRY_MS = 1_000
export const MAX_RETRY_MS = 30_000
/** A blip shorter than this (a server restarting, a phone changing networks) is not worth showing. */
export const PAUSED_AFTER_MS = 5_000

/**
 * One live stream per signed-in staff browser, shared by every page: pages subscribe with on()
 * and refetch what they show when told 'reconnected', since events sent while the stream was
 * down are not replayed.
 */
export const useLiveStore = defineStore('live', () => {
  const connected = ref(false)
  /** Wanted but not connected for longer than PAUSED_AFTER_MS. */
  const paused = ref(false)

  const handlers = new Map<string, Set<(event?: LiveEvent) => void>>()
  let source: EventSource | null = null
  let wanted = false
  let hasOpened = false
  let attempt = 0
  let retryTimer: ReturnType<typeof setTimeout> | null = null
  let pausedTimer: ReturnType<typeof setTimeout> | null = null

  function emit(type: string, event?: LiveEvent) {
    for (const fn of [...(handlers.get(type) ?? [])]) {
      try {
        fn(event)
      } catch (err) {
        // One page's mistake must not stop the others hearing the event.
        console.error(err)
      }
    }
  }

  function down() {
    connected.value = false
    if (!wanted || paused.value || pausedTimer) return
    pausedTimer = setTimeout(() => {
      pausedTimer = null
      paused.value = true
    }, PAUSED_AFTER_MS)
  }

  function up() {
    connected.value = true
    paused.value = false
    if (pausedTimer) clearTimeout(pausedTimer)
    pausedTimer = null
  }

  function received(es: EventSource, message: MessageEvent<string>) {
    if (es !== source) return
    let parsed: unknown
    try {
      parsed = JSON.parse(message.data)
    } catch {
      return
    }
    const result = LiveEventSchema.safeParse(parsed)
    if (!result.success) return
    emit(result.data.type, result.data)
    emit('*', result.data)
  }

  function open() {
    // Older browsers and test DOMs have no EventSource: the pages still work, only not live.
    if (typeof EventSource === 'undefined') return
    const es = new EventSource(LIVE_URL, { withCredentials: true })
    source = es
    es.onopen = () => {
      if (es !== source) return
      attempt = 0
      up()
      if (hasOpened) emit('reconnected')
      hasOpened = true
    }
    es.onerror = () => {
      if (es !== source) return
      down()
      // CONNECTING: the browser retries by itself. CLOSED: it gave up (401, 403, 503, wrong type).
      if (es.readyState !== CLOSED) return
      es.close()
      source = null
      const wait = Math.min(MAX_RETRY_MS, FIRST_RETRY_MS * 2 ** attempt)
      attempt += 1
      retryTimer = setTimeout(() => {
        retryTimer = null
        if (wanted && !source) open()
      }, wait)
    }
    for (const type of liveTypes) es.addEventListener(type, (m) => received(es, m))
    es.addEventListener(RESYNC_EVENT, () => {
      if (es === source) emit('reconnected')
    })
  }

  /** Opens the stream if it is not open yet. */
  function connect(): void {
    if (wanted) return
    wanted = true
    down()
    open()
  }

  function disconnect(): void {
    wanted = false
    hasOpened = false
    attempt = 0
    if (retryTimer) clearTimeout(retryTimer)
    retryTimer = null
    if (pausedTimer) clearTimeout(pausedTimer)
    pausedTimer = null
    source?.close()
    source = null
    connected.value = false
    paused.value = false
  }

  /** Hears one kind of event, every event ('*'), or 'reconnected'; returns the function that stops it. */
  function on(type: LiveEventType | '*', handler: LiveHandler): () => void
  function on(type: 'reconnected', handler: () => void): () => void
  function on(type: string, handler: (event: LiveEvent) => void): () => void {
    let set = handlers.get(type)
    if (!set) {
      set = new Set()
      handlers.set(type, set)
    }
    const fn = handler as (event?: LiveEvent) => void
    set.add(fn)
    return () => {
      handlers.get(type)?.delete(fn)
    }
  }

  return { connected, paused, connect, disconnect, on }
})
