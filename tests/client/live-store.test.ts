import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { FIRST_RETRY_MS, MAX_RETRY_MS, PAUSED_AFTER_MS, useLiveStore } from '@/stores/live'
import type { LiveEvent } from '@shared/schemas/live'
import { FakeEventSource } from './support/event-source'

const latest = () => {
  const es = FakeEventSource.made.at(-1)
  if (!es) throw new Error('no EventSource was opened')
  return es
}

function liveEvent(type: LiveEvent['type'], summary = 'Item 1 approved'): LiveEvent {
  return {
    type,
    workshopId: '6f1c2d3e-4a5b-4c6d-8e7f-101112131415',
    estimateId: '7a2b3c4d-5e6f-4a1b-8c2d-3e4f5a6b7c8d',
    status: 'sent',
    summary,
    at: '2025-03-04T10:00:00.000Z',
  }
}

beforeEach(() => {
  setActivePinia(createPinia())
  FakeEventSource.made = []
  vi.stubGlobal('EventSource', FakeEventSource)
  vi.useFakeTimers()
})

afterEach(() => {
  useLiveStore().disconnect()
  vi.useRealTimers()
  vi.unstubAllGlobals()
})

describe('useLiveStore', () => {
  it('opens one stream to /api/live with credentials, however often connect() is called', () => {
    const live = useLiveStore()
    live.connect()
    live.connect()
    expect(FakeEventSource.made).toHaveLength(1)
    expect(latest().url).toBe('/api/live')
    expect(latest().init).toEqual({ withCredentials: true })
    expect(live.connected).toBe(false)
    latest().serverOpens()
    expect(live.connected).toBe(true)
  })

  it('hands each event to the handlers for its type and to "*", until they stop listening', () => {
    const live = useLiveStore()
    const decisions: LiveEvent[] = []
    const sent: LiveEvent[] = []
    const everything: string[] = []
    const offDecisions = live.on('estimate.decision', (e) => decisions.push(e))
    live.on('estimate.sent', (e) => sent.push(e))
    live.on('*', (e) => everything.push(e.type))
    live.connect()
    latest().serverOpens()

    latest().serverSends('estimate.decision', liveEvent('estimate.decision'))
    latest().serverSends('estimate.sent', liveEvent('estimate.sent', 'Sent to the customer'))
    expect(decisions.map((e) => e.summary)).toEqual(['Item 1 approved'])
    expect(sent.map((e) => e.summary)).toEqual(['Sent to the customer'])
    expect(everything).toEqual(['estimate.decision', 'estimate.sent'])

    offDecisions()
    latest().serverSends('estimate.decision', liveEvent('estimate.decision', 'Item 2 declined'))
    expect(decisions).toHaveLength(1)
    expect(everything).toHaveLength(3)
  })

  it('ignores data that is not a live event', () => {
    const live = useLiveStore()
    const heard = vi.fn()
    live.on('*', heard)
    live.connect()
    latest().serverOpens()
    latest().serverSends('estimate.decision', 'not json')
    latest().serverSends('estimate.decision', { ...liveEvent('estimate.decision'), workshopId: 'nope' })
    expect(heard).not.toHaveBeenCalled()
  })

  it('keeps other handlers hearing an event when one of them throws', () => {
    const live = useLiveStore()
    const quiet = vi.spyOn(console, 'error').mockImplementation(() => undefined)
    const second = vi.fn()
    live.on('estimate.question', () => {
      throw new Error('page bug')
    })
    live.on('estimate.question', second)
    live.connect()
    latest().serverOpens()
    latest().serverSends('estimate.question', liveEvent('estimate.question'))
    expect(second).toHaveBeenCalledTimes(1)
    expect(quiet).toHaveBeenCalledTimes(1)
  })

  it('says "reconnected" when the browser reopens a dropped stream by itself, so pages refetch', () => {
    const live = useLiveStore()
    const reconnected = vi.fn()
    live.on('reconnected', reconnected)
    live.connect()
    latest().serverOpens()
    expect(reconnected).not.toHaveBeenCalled()

    latest().fails(false)
    expect(live.connected).toBe(false)
    latest().serverOpens()
    expect(FakeEventSource.made).toHaveLength(1)
    expect(live.connected).toBe(true)
    expect(reconnected).toHaveBeenCalledTimes(1)
  })

  it('says "reconnected" when the server reports its own database listener came back', () => {
    const live = useLiveStore()
    const reconnected = vi.fn()
    live.on('reconnected', reconnected)
    live.connect()
    latest().serverOpens()
    latest().serverSends('resync', {})
    expect(reconnected).toHaveBeenCalledTimes(1)
  })

  it('opens a new stream with growing waits, up to 30 s, when the browser gives up on one', () => {
    const live = useLiveStore()
    const reconnected = vi.fn()
    live.on('reconnected', reconnected)
    live.connect()
    latest().serverOpens()

    const waits: number[] = []
    for (let i = 0; i < 7; i++) {
      const before = FakeEventSource.made.length
      latest().fails(true)
      expect(latest().closed).toBe(true)
      let waited = 0
      while (FakeEventSource.made.length === before) {
        vi.advanceTimersByTime(250)
        waited += 250
        if (waited > MAX_RETRY_MS * 2) throw new Error('never reopened')
      }
      waits.push(waited)
    }
    expect(waits).toEqual([1_000, 2_000, 4_000, 8_000, 16_000, 30_000, 30_000])
    expect(FIRST_RETRY_MS).toBe(1_000)

    latest().serverOpens()
    expect(live.connected).toBe(true)
    expect(reconnected).toHaveBeenCalledTimes(1)

    // Once open again, the next failure starts from the first wait.
    latest().fails(true)
    vi.advanceTimersByTime(FIRST_RETRY_MS)
    expect(FakeEventSource.made).toHaveLength(9)
  })

  it('shows itself paused only after being disconnected for a while', () => {
    const live = useLiveStore()
    live.connect()
    latest().serverOpens()
    latest().fails(false)
    vi.advanceTimersByTime(PAUSED_AFTER_MS - 100)
    expect(live.paused).toBe(false)
    vi.advanceTimersByTime(200)
    expect(live.paused).toBe(true)
    latest().serverOpens()
    expect(live.paused).toBe(false)

    // A stream that never opened at all counts too.
    live.disconnect()
    live.connect()
    vi.advanceTimersByTime(PAUSED_AFTER_MS + 100)
    expect(live.paused).toBe(true)
  })

  it('closes the stream on disconnect and does not come back by itself', () => {
    const live = useLiveStore()
    const heard = vi.fn()
    live.on('*', heard)
    live.connect()
    const first = latest()
    first.serverOpens()
    first.fails(true)
    live.disconnect()
    expect(first.closed).toBe(true)
    expect(live.connected).toBe(false)
    vi.advanceTimersByTime(MAX_RETRY_MS * 2)
    expect(FakeEventSource.made).toHaveLength(1)
    expect(live.paused).toBe(false)

    // A stream closed by disconnect() is deaf even if the browser still delivers to it.
    first.serverSends('estimate.decision', liveEvent('estimate.decision'))
    expect(heard).not.toHaveBeenCalled()

    live.connect()
    expect(FakeEventSource.made).toHaveLength(2)
    expect(latest().closed).toBe(false)
  })

  it('does nothing where the browser has no EventSource', () => {
    vi.stubGlobal('EventSource', undefined)
    const live = useLiveStore()
    expect(() => live.connect()).not.toThrow()
    expect(live.connected).toBe(false)
  })
})
