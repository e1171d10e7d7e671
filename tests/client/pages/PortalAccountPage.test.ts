// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest'
import { createMemoryHistory, createRouter } from 'vue-router'
import { getMe, signOut } from '@/api/auth'
import { listMyEstimates, listMyVehicles } from '@/api/portal-account'
import App from '@/App.vue'
import { installGuards, routes } from '@/router'
import { buttonByName } from '../support/dom'
import { customerPrincipal } from '../support/principals'
import { preloadRouteComponents } from '../support/router'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/auth', () => ({ getMe: vi.fn(), requestSignInLink: vi.fn(), verifySignInLink: vi.fn(), signOut: vi.fn() }))
vi.mock('@/api/portal-account', () => ({ listMyVehicles: vi.fn(), listMyEstimates: vi.fn() }))

let unmount: (() => void) | undefined

async function mountAccount() {
  const pinia = createPinia()
  setActivePinia(pinia)
  const router = createRouter({ history: createMemoryHistory(), routes })
  installGuards(router)
  await router.push('/portal/account')
  const wrapper = mount(App, { attachTo: document.body, global: { plugins: [createTestVuetify(), pinia, router] } })
  unmount = () => wrapper.unmount()
  await flushPromises()
  return { wrapper, router }
}

beforeAll(() => preloadRouteComponents())

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
  vi.mocked(getMe).mockResolvedValue(customerPrincipal)
  vi.mocked(listMyVehicles).mockReset()
  vi.mocked(listMyEstimates).mockReset().mockResolvedValue([])
  vi.mocked(signOut).mockReset()
})

afterEach(() => {
  unmount?.()
  unmount = undefined
  vi.unstubAllGlobals()
})

describe('portal account', () => {
  it('greets the customer, names their workshop and lists their vehicles', async () => {
    vi.mocked(listMyVehicles).mockResolvedValue([
      { id: '5a0c1f07-6183-44b5-8fc0-71921bd45f66', registration: 'HM19 TRX', make: 'Fenwick', model: 'Ridgeway', year: 2019 },
      { id: '6b1d2018-7294-45c6-90d1-82a32ce56077', registration: 'HM05 OLD', make: 'Fenwick', model: 'Moorland', year: null },
    ])
    const { wrapper } = await mountAccount()

    expect(wrapper.get('main h1').text()).toBe('Hello, Juno Treadwell')
    expect(wrapper.get('header').text()).toBe('Hollowmere 4x4')
    const vehicles = wrapper
      .get('[role="list"][aria-label="Your vehicles"]')
      .findAll('[role="listitem"]')
      .map((i) => i.text())
    expect(vehicles).toEqual(['HM19 TRXFenwick Ridgeway, 2019', 'HM05 OLDFenwick Moorland'])
    expect(wrapper.get('main').text()).toMatch(/sends you an estimate, it will appear here/)
  })

  it('says so when there are no vehicles yet', async () => {
    vi.mocked(listMyVehicles).mockResolvedValue([])
    const { wrapper } = await mountAccount()

    expect(wrapper.get('main').text()).toContain('no vehicles on record for you yet')
  })

  it('signs out to the portal sign-in page', async () => {
    vi.mocked(listMyVehicles).mockResolvedValue([])
    vi.mocked(signOut).mockResolvedValue(undefined)
    const { router } = await mountAccount()

    buttonByName('Sign out').click()
    await flushPromises()

    expect(signOut).toHaveBeenCalledOnce()
    expect(router.currentRoute.value.name).toBe('portal-sign-in')
  })
})
