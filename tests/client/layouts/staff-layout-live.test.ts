// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest'
import { nextTick } from 'vue'
import { createMemoryHistory, createRouter } from 'vue-router'
import { getMe, signOut } from '@/api/auth'
import { getHealth, getReady } from '@/api/system'
import App from '@/App.vue'
import { installGuards, routes } from '@/router'
import { PAUSED_AFTER_MS } from '@/stores/live'
import type { StaffRole } from '@shared/auth/policy'
import { buttonByName } from '../support/dom'
import { FakeEventSource } from '../support/event-source'
import { staffPrincipal } from '../support/principals'
import { preloadRouteComponents } from '../support/router'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/system', () => ({ getHealth: vi.fn(), getReady: vi.fn() }))
vi.mock('@/api/auth', () => ({ getMe: vi.fn(), requestSignInLink: vi.fn(), verifySignInLink: vi.fn(), signOut: vi.fn() }))
vi.mock('@/api/workshop', () => ({ getWorkshop: vi.fn(() => new Promise(() => {})), saveWorkshop: vi.fn() }))

let unmount: (() => void) | undefined

async function signedInAs(role: StaffRole) {
  vi.mocked(getMe).mockResolvedValue(staffPrincipal(role))
  const pinia = createPinia()
  setActivePinia(pinia)
  const router = createRouter({ history: createMemoryHistory(), routes })
  installGuards(router)
  await router.push('/')
  const wrapper = mount(App, { attachTo: document.body, global: { plugins: [createTestVuetify(), pinia, router] } })
  unmount = () => wrapper.unmount()
  await flushPromises()
  return { router }
}

const liveStatus = () => document.querySelector('header [role="status"]')
const text = (el: Element | null) => (el?.textContent ?? '').replace(/\s+/g, ' ').trim()

beforeAll(() => preloadRouteComponents())

beforeEach(() => {
  FakeEventSource.made = []
  vi.stubGlobal('EventSource', FakeEventSource)
  vi.stubGlobal('visualViewport', undefined)
  // Only the timers the live store uses: promises and Vue's scheduler keep running for real.
  vi.useFakeTimers({ toFake: ['setTimeout', 'clearTimeout'] })
  vi.mocked(getHealth).mockResolvedValue({ status: 'ok', uptimeSeconds: 5, version: '0.1.0' })
  vi.mocked(getReady).mockResolvedValue({ status: 'ready', database: 'ok' })
})

afterEach(() => {
  unmount?.()
  unmount = undefined
  vi.useRealTimers()
  vi.unstubAllGlobals()
})

describe('live updates in the staff layout', () => {
  it('opens the live stream for an advisor and says so, politely, when it has been down a while', async () => {
    await signedInAs('advisor')
    expect(FakeEventSource.made).toHaveLength(1)
    const stream = FakeEventSource.made[0]!
    expect(stream.url).toBe('/api/live')
    stream.serverOpens()
    await nextTick()
    expect(liveStatus()).not.toBeNull()
    expect(text(liveStatus())).toBe('')

    stream.fails(false)
    vi.advanceTimersByTime(PAUSED_AFTER_MS - 500)
    await nextTick()
    expect(text(liveStatus())).toBe('')
    vi.advanceTimersByTime(1_000)
    await nextTick()
    expect(text(liveStatus())).toBe('Live updates paused — reconnecting')

    stream.serverOpens()
    await nextTick()
    expect(text(liveStatus())).toBe('')
  })

  it('opens no stream for a technician, whose role does not read estimates', async () => {
    await signedInAs('technician')
    expect(FakeEventSource.made).toHaveLength(0)
  })

  it('closes the stream when the person signs out', async () => {
    vi.mocked(signOut).mockResolvedValue(undefined)
    await signedInAs('owner')
    const stream = FakeEventSource.made[0]!
    stream.serverOpens()

    buttonByName(/^Your account/).click()
    await flushPromises()
    buttonByName('Sign out').click()
    await flushPromises()

    expect(stream.closed).toBe(true)
    vi.advanceTimersByTime(60_000)
    expect(FakeEventSource.made).toHaveLength(1)
  })
})
