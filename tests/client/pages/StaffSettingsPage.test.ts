// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { createMemoryHistory, createRouter } from 'vue-router'
import { VApp } from 'vuetify/components'
import { getMe } from '@/api/auth'
import { ApiError } from '@/api/http'
import { getWorkshop, saveWorkshop } from '@/api/workshop'
import AppNotifications from '@/components/app/AppNotifications.vue'
import StaffSettingsPage from '@/pages/staff/StaffSettingsPage.vue'
import { routes } from '@/router'
import { useAuthStore } from '@/stores/auth'
import type { StaffRole } from '@shared/auth/policy'
import type { Workshop } from '@shared/schemas/workshop'
import { fieldByLabel, fieldMessages, queryButtonByName, statusMessages, typeInto } from '../support/dom'
import { staffPrincipal, testWorkshop } from '../support/principals'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/auth', () => ({ getMe: vi.fn(), requestSignInLink: vi.fn(), verifySignInLink: vi.fn(), signOut: vi.fn() }))
vi.mock('@/api/workshop', () => ({ getWorkshop: vi.fn(), saveWorkshop: vi.fn() }))

const workshop: Workshop = {
  id: testWorkshop.id,
  name: testWorkshop.name,
  addressLines: ['3 Sump Lane', 'Hollowmere'],
  postcode: 'HM1 2AB',
  phone: '01632 960555',
  email: 'desk@hollowmere.test',
  vatNumber: null,
  currency: 'GBP',
  timezone: 'Europe/London',
}

let unmount: (() => void) | undefined

async function mountPage(role: StaffRole) {
  const pinia = createPinia()
  setActivePinia(pinia)
  const auth = useAuthStore()
  auth.user = staffPrincipal(role)
  auth.hasLoaded = true
  const router = createRouter({ history: createMemoryHistory(), routes })
  await router.push({ name: 'settings' })
  const Host = defineComponent(() => () => h(VApp, () => [h(StaffSettingsPage), h(AppNotifications)]))
  const wrapper = mount(Host, { attachTo: document.body, global: { plugins: [createTestVuetify(), pinia, router] } })
  unmount = () => wrapper.unmount()
  await flushPromises()
  return wrapper
}

function save() {
  const button = queryButtonByName('Save changes')
  if (!button) throw new Error('No Save changes button')
  button.click()
  return flushPromises()
}

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
  vi.mocked(getWorkshop).mockReset()
  vi.mocked(getWorkshop).mockResolvedValue(workshop)
  vi.mocked(saveWorkshop).mockReset()
  vi.mocked(getMe).mockReset()
  vi.mocked(getMe).mockResolvedValue(staffPrincipal('owner'))
})

afterEach(() => {
  unmount?.()
  unmount = undefined
  vi.unstubAllGlobals()
})

describe('workshop settings', () => {
  it("shows the workshop's details, the address one line each", async () => {
    await mountPage('owner')

    expect(fieldByLabel('Workshop name').value).toBe('Hollowmere 4x4')
    expect(fieldByLabel('Address').value).toBe('3 Sump Lane\nHollowmere')
    expect(fieldByLabel('Postcode').value).toBe('HM1 2AB')
    expect(fieldByLabel('VAT number').value).toBe('')
    expect(fieldByLabel('Time zone').value).toBe('Europe/London')
  })

  it('saves what the owner typed, tidied by the shared rules, and says so', async () => {
    vi.mocked(saveWorkshop).mockImplementation(async (s) => ({ ...s, id: workshop.id }) as Workshop)
    await mountPage('owner')

    typeInto(fieldByLabel('Address'), ' 3 Sump Lane \n\nHollowmere\n')
    typeInto(fieldByLabel('Phone'), '')
    typeInto(fieldByLabel('VAT number'), 'GB123456789')
    await flushPromises()
    await save()

    expect(saveWorkshop).toHaveBeenCalledWith({
      name: 'Hollowmere 4x4',
      addressLines: ['3 Sump Lane', 'Hollowmere'],
      postcode: 'HM1 2AB',
      phone: null,
      email: 'desk@hollowmere.test',
      vatNumber: 'GB123456789',
      currency: 'GBP',
      timezone: 'Europe/London',
    })
    expect(statusMessages().join(' ')).toContain('Workshop details saved.')
    // The app bar shows the workshop's name from the principal, so it is asked for again.
    expect(getMe).toHaveBeenCalledOnce()
  })

  it('refuses a missing name before asking the server', async () => {
    await mountPage('owner')

    typeInto(fieldByLabel('Workshop name'), '   ')
    await flushPromises()
    await save()

    expect(saveWorkshop).not.toHaveBeenCalled()
    expect(fieldMessages(fieldByLabel('Workshop name'))).toBe('Enter the workshop name')
  })

  it("puts the server's 422 message on the field it names", async () => {
    vi.mocked(saveWorkshop).mockRejectedValue(
      new ApiError(422, 'validation_failed', 'Some of the details are not right.', [
        { path: ['body', 'timezone'], message: 'Not a time zone this system knows, e.g. Europe/London' },
      ]),
    )
    await mountPage('owner')

    await save()

    expect(fieldMessages(fieldByLabel('Time zone'))).toBe('Not a time zone this system knows, e.g. Europe/London')
  })

  it.each(['advisor', 'technician'] as const)('lets a %s read the details but not change them', async (role) => {
    await mountPage(role)

    expect(fieldByLabel('Workshop name').value).toBe('Hollowmere 4x4')
    expect(fieldByLabel('Workshop name').readOnly).toBe(true)
    expect(fieldByLabel('Address').readOnly).toBe(true)
    expect(queryButtonByName('Save changes')).toBeNull()
    expect(document.body.textContent).toContain('Only an owner can change these details.')
  })
})
