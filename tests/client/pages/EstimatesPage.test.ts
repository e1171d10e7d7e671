// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { createMemoryHistory, createRouter } from 'vue-router'
import { VApp } from 'vuetify/components'
import { listEstimates } from '@/api/estimates'
import EstimatesPage from '@/pages/staff/EstimatesPage.vue'
import { routes } from '@/router'
import { useAuthStore } from '@/stores/auth'
import { LIVE_REFRESH_DELAY_MS } from '@/stores/estimate-live'
import { useLiveStore } from '@/stores/live'
import { chooseOption, fieldByLabel, typeInto } from '../support/dom'
import { estimateIds, estimateSummary } from '../support/estimates'
import { staffPrincipal } from '../support/principals'
import { page, testWorkshop } from '../support/records'
import { setViewport } from '../support/viewport'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/estimates', () => ({ listEstimates: vi.fn() }))

let unmount: (() => void) | undefined

/** Stands in for the browser's EventSource so a test can deliver what the server would send. */
class FakeEventSource {
  static last: FakeEventSource | null = null
  readyState = 1
  onopen: (() => void) | null = null
  onerror: (() => void) | null = null
  private listeners = new Map<string, ((message: { data: string }) => void)[]>()
  constructor(readonly url: string) {
    FakeEventSource.last = this
  }
  addEventListener(type: string, fn: (message: { data: string }) => void): void {
    this.listeners.set(type, [...(this.listeners.get(type) ?? []), fn])
  }
  close(): void {
    this.readyState = 2
  }
  deliver(type: string, data: object): void {
    for (const fn of this.listeners.get(type) ?? []) fn({ data: JSON.stringify(data) })
  }
}

async function mountPage() {
  const pinia = createPinia()
  setActivePinia(pinia)
  const auth = useAuthStore()
  auth.user = staffPrincipal('advisor')
  auth.hasLoaded = true
  const router = createRouter({ history: createMemoryHistory(), routes })
  await router.push({ name: 'estimates' })
  const Host = defineComponent(() => () => h(VApp, () => h(EstimatesPage)))
  const wrapper = mount(Host, { attachTo: document.body, global: { plugins: [createTestVuetify(), pinia, router] } })
  unmount = () => wrapper.unmount()
  await flushPromises()
  return { wrapper, router }
}

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
  vi.mocked(listEstimates).mockReset()
  vi.mocked(listEstimates).mockResolvedValue(page([estimateSummary({ status: 'confirmed', approvedGross: 14500, depositMinor: 3625 })], 1))
})

afterEach(() => {
  unmount?.()
  unmount = undefined
  vi.unstubAllGlobals()
  setViewport(1024, 768)
})

describe('estimates page', () => {
  it('lists number, customer, vehicle, status in words beside an icon, and the money', async () => {
    const { wrapper } = await mountPage()

    const row = wrapper.get('tbody tr')
    expect(row.text()).toContain('E-0042')
    expect(row.text()).toContain('Maris Fenwick')
    expect(row.text()).toContain('HM15 KNX')
    const chip = row.get('.v-chip')
    expect(chip.text()).toBe('Confirmed by the customer')
    expect(chip.find('svg').exists()).toBe(true)
    expect(row.text()).toContain('£174.00')
    expect(row.text()).toContain('£145.00')
    expect(row.text()).toContain('£36.25')
  })

  it('filters by status, named in plain words', async () => {
    await mountPage()

    await chooseOption(fieldByLabel('Status'), 'Opened by the customer', flushPromises)

    expect(listEstimates).toHaveBeenLastCalledWith(expect.objectContaining({ status: 'opened', page: 1 }))
  })

  it('searches by what was typed, from the first page', async () => {
    await mountPage()
    const search = fieldByLabel('Search estimates')

    typeInto(search, 'HM15')
    search.dispatchEvent(new KeyboardEvent('keydown', { key: 'Enter', bubbles: true }))
    await flushPromises()

    expect(listEstimates).toHaveBeenLastCalledWith(expect.objectContaining({ q: 'HM15', page: 1, sortBy: 'updatedAt', sortDesc: true }))
  })

  it('reloads the rows once when a customer acts on an estimate in view', async () => {
    vi.stubGlobal('EventSource', FakeEventSource)
    await mountPage()
    useLiveStore().connect()
    const stream = FakeEventSource.last!
    expect(listEstimates).toHaveBeenCalledOnce()

    const at = '2026-03-02T15:12:00.000Z'
    stream.deliver('estimate.decision', { type: 'estimate.decision', workshopId: testWorkshop.id, estimateId: estimateIds.estimate, at })
    stream.deliver('estimate.confirmed', {
      type: 'estimate.confirmed',
      workshopId: testWorkshop.id,
      estimateId: estimateIds.estimate,
      status: 'confirmed',
      at,
    })
    stream.deliver('estimate.opened', { type: 'estimate.opened', workshopId: testWorkshop.id, estimateId: estimateIds.other, at })
    await new Promise((resolve) => setTimeout(resolve, LIVE_REFRESH_DELAY_MS + 50))
    await flushPromises()

    expect(listEstimates).toHaveBeenCalledTimes(2)
    useLiveStore().disconnect()
  })

  it('shows each estimate as one card on a phone, opening it when tapped', async () => {
    setViewport(390, 844)
    const { wrapper, router } = await mountPage()

    const push = vi.spyOn(router, 'push')

    const card = wrapper.get('.records-table__card')
    expect(card.text()).toContain('E-0042')
    expect(card.text()).toContain('Approved £145.00')
    await card.trigger('click')

    expect(push).toHaveBeenCalledWith({ name: 'estimate', params: { id: estimateSummary().id } })
  })
})
