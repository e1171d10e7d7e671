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
import type { StaffRole } from '@shared/auth/policy'
import { buttonByName } from '../support/dom'
import { staffPrincipal } from '../support/principals'
import { preloadRouteComponents } from '../support/router'
import { setViewport } from '../support/viewport'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/system', () => ({ getHealth: vi.fn(), getReady: vi.fn() }))
vi.mock('@/api/auth', () => ({ getMe: vi.fn(), requestSignInLink: vi.fn(), verifySignInLink: vi.fn(), signOut: vi.fn() }))
vi.mock('@/api/workshop', () => ({ getWorkshop: vi.fn(() => new Promise(() => {})), saveWorkshop: vi.fn() }))

let unmount: (() => void) | undefined

async function signedInAs(role: StaffRole, path = '/') {
  vi.mocked(getMe).mockResolvedValue(staffPrincipal(role))
  const pinia = createPinia()
  setActivePinia(pinia)
  const router = createRouter({ history: createMemoryHistory(), routes })
  installGuards(router)
  await router.push(path)
  const wrapper = mount(App, { attachTo: document.body, global: { plugins: [createTestVuetify(), pinia, router] } })
  unmount = () => wrapper.unmount()
  await flushPromises()
  return { wrapper, router }
}

function navTitles(): string[] {
  const nav = document.querySelector('nav[aria-label="Main"]')
  return [...(nav?.querySelectorAll('a') ?? [])].map((a) => (a.textContent ?? '').trim())
}

beforeAll(() => preloadRouteComponents())

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
  vi.mocked(getHealth).mockResolvedValue({ status: 'ok', uptimeSeconds: 5, version: '0.1.0' })
  vi.mocked(getReady).mockResolvedValue({ status: 'ready', database: 'ok' })
  vi.mocked(signOut).mockReset()
})

afterEach(() => {
  unmount?.()
  unmount = undefined
  vi.unstubAllGlobals()
  setViewport(1024, 768)
})

describe('the app bar', () => {
  it("shows the workshop's name and, in the account menu, the person, role and a way to sign out", async () => {
    setViewport(390, 844)
    await signedInAs('technician')

    expect(document.querySelector('header')?.textContent).toContain('Hollowmere 4x4')
    const account = buttonByName('Your account: Pim Sayer, Technician')
    account.click()
    await flushPromises()

    const menu = document.getElementById(account.getAttribute('aria-controls') ?? '')
    expect(menu?.textContent).toContain('Pim Sayer')
    expect(menu?.textContent).toContain('technician@hollowmere.test')
    expect([...(menu?.querySelectorAll('dt') ?? [])].map((dt) => `${dt.textContent}: ${dt.nextElementSibling?.textContent}`)).toEqual([
      'Role: Technician',
      'Workshop: Hollowmere 4x4',
    ])
    expect(buttonByName('Sign out', menu!)).toBeTruthy()
  })

  it('signs out and lands on the sign-in page with no navigation left', async () => {
    vi.mocked(signOut).mockResolvedValue(undefined)
    const { router } = await signedInAs('owner')

    buttonByName(/^Your account/).click()
    await flushPromises()
    buttonByName('Sign out').click()
    await flushPromises()

    expect(signOut).toHaveBeenCalledOnce()
    expect(router.currentRoute.value.name).toBe('sign-in')
    expect(document.querySelector('nav[aria-label="Main"]')).toBeNull()
    expect(document.querySelector('header')?.textContent).not.toContain('Hollowmere 4x4')
  })
})

describe('navigation', () => {
  it('keeps four buttons in a phone’s bottom bar and puts the rest under More', async () => {
    setViewport(390, 844)
    await signedInAs('owner')

    const bar = document.querySelector('nav[aria-label="Main"]')
    const buttons = [...(bar?.querySelectorAll('a, button') ?? [])].map((b) => (b.textContent ?? '').trim())
    expect(buttons).toEqual(['Home', 'Jobs', 'Estimates', 'More'])
    buttonByName('More', bar as HTMLElement).click()
    await flushPromises()
    const sheet = document.querySelector('[aria-label="More pages"] .v-list, .v-list[aria-label="More pages"]')
    const more = [...(sheet?.querySelectorAll('a') ?? [])].map((a) => (a.textContent ?? '').trim())
    expect(more).toEqual(expect.arrayContaining(['Vehicles', 'Customers', 'Team', 'Settings', 'Activity log']))
  })

  it('offers an owner the team, settings and activity log', async () => {
    await signedInAs('owner')

    expect(navTitles()).toEqual(expect.arrayContaining(['Home', 'Team', 'Settings', 'Activity log']))
  })

  it.each(['advisor', 'technician'] as const)('offers a %s settings to read, but not the team or the activity log', async (role) => {
    await signedInAs(role)

    expect(navTitles()).toEqual(expect.arrayContaining(['Home', 'Settings']))
    expect(navTitles()).not.toContain('Team')
    expect(navTitles()).not.toContain('Activity log')
  })

  it('moves keyboard focus to the new page after following a link', async () => {
    const { router } = await signedInAs('owner')

    await router.push({ name: 'settings' })
    await flushPromises()
    await nextTick()

    expect(document.activeElement?.id).toBe('main')
    expect(document.title).toBe('Workshop settings · Tickover')
  })
})
