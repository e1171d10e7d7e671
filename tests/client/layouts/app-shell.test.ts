// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, describe, expect, it, vi } from 'vitest'
import { createMemoryHistory, createRouter } from 'vue-router'
import { getMe } from '@/api/auth'
import { getHealth, getReady } from '@/api/system'
import App from '@/App.vue'
import { installGuards, routes } from '@/router'
import { staffPrincipal } from '../support/principals'
import { setViewport } from '../support/viewport'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/system', () => ({ getHealth: vi.fn(), getReady: vi.fn() }))
vi.mock('@/api/auth', () => ({ getMe: vi.fn(), requestSignInLink: vi.fn(), verifySignInLink: vi.fn(), signOut: vi.fn() }))

let unmount: (() => void) | undefined

async function mountAt(path: string) {
  vi.mocked(getHealth).mockResolvedValue({ status: 'ok', uptimeSeconds: 5, version: '0.1.0' })
  vi.mocked(getReady).mockResolvedValue({ status: 'ready', database: 'ok' })
  // The staff pages need someone signed in; the guards ask the store before the app is mounted.
  vi.mocked(getMe).mockResolvedValue(staffPrincipal('owner'))
  const pinia = createPinia()
  setActivePinia(pinia)
  const router = createRouter({ history: createMemoryHistory(), routes })
  installGuards(router)
  await router.push(path)
  const wrapper = mount(App, {
    attachTo: document.body,
    global: { plugins: [createTestVuetify(), pinia, router] },
  })
  unmount = () => wrapper.unmount()
  await router.isReady()
  await flushPromises()
  return { wrapper, router }
}

afterEach(() => {
  unmount?.()
  setViewport(1024, 768)
})

describe('staff layout', () => {
  it('has the product name, a labelled navigation and a main landmark to skip to', async () => {
    const { wrapper } = await mountAt('/')

    expect(wrapper.get('header').text()).toContain('Tickover')
    expect(wrapper.get('nav[aria-label="Main"]').text()).toContain('Home')
    const main = wrapper.get('main#main')
    expect(main.text()).toContain('Welcome to Tickover')

    const skip = wrapper.get('a.app-skip-link')
    expect(skip.text()).toBe('Skip to content')
    await skip.trigger('click')
    expect(document.activeElement).toBe(main.element)
  })

  it('puts the skip link before everything else a keyboard reaches', async () => {
    const { wrapper } = await mountAt('/')

    const firstFocusable = wrapper.element.querySelector('a[href], button')
    expect(firstFocusable?.textContent).toBe('Skip to content')
  })

  it('keeps the navigation at the bottom, under the thumb, on a 390 px phone', async () => {
    setViewport(390, 844)
    const { wrapper } = await mountAt('/')

    const nav = wrapper.get('nav[aria-label="Main"]')
    expect(nav.classes()).toContain('v-bottom-navigation')
    expect(wrapper.find('.v-navigation-drawer').exists()).toBe(false)
  })

  it('uses a side drawer on a wide screen', async () => {
    setViewport(1280, 800)
    const { wrapper } = await mountAt('/')

    expect(wrapper.get('nav[aria-label="Main"]').classes()).toContain('v-navigation-drawer')
    expect(wrapper.find('.v-bottom-navigation').exists()).toBe(false)
  })

  it('names the browser tab after the page', async () => {
    await mountAt('/')

    expect(document.title).toBe('Home · Tickover')
  })
})

describe('portal layout', () => {
  it('explains that the estimate opens from the e-mail link, without a password', async () => {
    const { wrapper, router } = await mountAt('/portal')

    expect(router.currentRoute.value.name).toBe('portal-welcome')
    expect(wrapper.get('main#main h1').text()).toBe('Your repair estimate')
    expect(wrapper.text()).toContain('No password needed')
    expect(wrapper.text()).toMatch(/link in that e-mail/)
    expect(wrapper.find('a.app-skip-link').exists()).toBe(true)
  })

  it('shows customers none of the staff navigation', async () => {
    const { wrapper } = await mountAt('/portal')

    expect(wrapper.find('nav').exists()).toBe(false)
    expect(wrapper.text()).not.toContain('Welcome to Tickover')
  })
})

describe('unknown addresses', () => {
  it('land on the not-found page with ways back', async () => {
    const { wrapper, router } = await mountAt('/no/such/page')

    expect(router.currentRoute.value.name).toBe('not-found')
    expect(wrapper.get('main h1').text()).toBe("We can't find that page")
    const links = wrapper.findAll('a').map((a) => a.attributes('href'))
    expect(links).toEqual(expect.arrayContaining(['/', '/portal']))
  })
})
