// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { createMemoryHistory, createRouter } from 'vue-router'
import { VApp } from 'vuetify/components'
import { archiveCustomer, deleteCustomer, getCustomer } from '@/api/customers'
import { ApiError } from '@/api/http'
import { listVehicles } from '@/api/vehicles'
import AppNotifications from '@/components/app/AppNotifications.vue'
import CustomerDetailPage from '@/pages/staff/CustomerDetailPage.vue'
import { routes } from '@/router'
import { useAuthStore } from '@/stores/auth'
import { buttonByName, headingText, openDialog, queryButtonByName } from '../support/dom'
import { staffPrincipal } from '../support/principals'
import { customer, page, testIds, vehicle } from '../support/records'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/customers', () => ({
  listCustomers: vi.fn(),
  getCustomer: vi.fn(),
  createCustomer: vi.fn(),
  updateCustomer: vi.fn(),
  archiveCustomer: vi.fn(),
  restoreCustomer: vi.fn(),
  deleteCustomer: vi.fn(),
}))
vi.mock('@/api/vehicles', () => ({
  listVehicles: vi.fn(),
  getVehicle: vi.fn(),
  createVehicle: vi.fn(),
  updateVehicle: vi.fn(),
  archiveVehicle: vi.fn(),
  restoreVehicle: vi.fn(),
  deleteVehicle: vi.fn(),
}))

const refusal =
  'This customer has vehicles or jobs on record, so they cannot be deleted. Archive them instead: they disappear from lists but their history is kept.'
let unmount: (() => void) | undefined

async function mountPage() {
  const pinia = createPinia()
  setActivePinia(pinia)
  const auth = useAuthStore()
  auth.user = staffPrincipal('advisor')
  auth.hasLoaded = true
  const router = createRouter({ history: createMemoryHistory(), routes })
  await router.push({ name: 'customer', params: { id: testIds.customer } })
  const Host = defineComponent(() => () => h(VApp, () => [h(CustomerDetailPage, { id: testIds.customer }), h(AppNotifications)]))
  const wrapper = mount(Host, { attachTo: document.body, global: { plugins: [createTestVuetify(), pinia, router] } })
  unmount = () => wrapper.unmount()
  await flushPromises()
  return { wrapper, router }
}

function snackbarText(): string {
  return document.querySelector('.v-snackbar')?.textContent ?? ''
}

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
  for (const fn of [getCustomer, archiveCustomer, deleteCustomer, listVehicles]) vi.mocked(fn).mockReset()
  vi.mocked(getCustomer).mockResolvedValue(customer())
  vi.mocked(listVehicles).mockResolvedValue(page([vehicle()], 1))
})

afterEach(() => {
  unmount?.()
  vi.unstubAllGlobals()
})

describe('customer page', () => {
  it('shows the customer, how to reach them and their vehicles', async () => {
    const { wrapper } = await mountPage()

    expect(headingText(1)).toEqual(['Maris Fenwick'])
    expect(wrapper.text()).toContain('maris@fenwick.test')
    expect(wrapper.text()).toContain('E-mail')
    expect(buttonByName(/HM15 KNX/).getAttribute('href')).toBe(`/vehicles/${testIds.vehicle}`)
    expect(listVehicles).toHaveBeenCalledWith(expect.objectContaining({ customerId: testIds.customer }))
  })

  it('shows the server’s refusal to delete and archives instead', async () => {
    vi.mocked(deleteCustomer).mockRejectedValue(new ApiError(409, 'in_use', refusal))
    vi.mocked(archiveCustomer).mockResolvedValue(customer({ archived: true }))
    const { wrapper } = await mountPage()

    buttonByName('Delete').click()
    await flushPromises()
    const dialog = openDialog()
    expect(dialog?.textContent).toContain('Delete Maris Fenwick?')
    buttonByName('Delete', dialog ?? document).click()
    await flushPromises()

    expect(deleteCustomer).toHaveBeenCalledWith(testIds.customer)
    expect(openDialog()?.querySelector('[role="alert"]')?.textContent).toContain(refusal)
    expect(queryButtonByName('Delete', openDialog() ?? document)).toBeNull()
    // A refusal is explained in the dialog, not also in a notification.
    expect(snackbarText()).toBe('')

    buttonByName('Archive instead', openDialog() ?? document).click()
    await flushPromises()

    expect(archiveCustomer).toHaveBeenCalledWith(testIds.customer)
    expect(openDialog()).toBeNull()
    expect(wrapper.text()).toContain('Archived')
    expect(buttonByName('Restore')).toBeTruthy()
    expect(snackbarText()).toContain('Maris Fenwick archived.')
  })

  it('deletes a customer nothing refers to and goes back to the list', async () => {
    vi.mocked(deleteCustomer).mockResolvedValue(undefined)
    const { router } = await mountPage()

    buttonByName('Delete').click()
    await flushPromises()
    buttonByName('Delete', openDialog() ?? document).click()
    await flushPromises()

    expect(deleteCustomer).toHaveBeenCalledWith(testIds.customer)
    // The list page loads lazily, so the navigation finishes a little later.
    await vi.waitFor(() => expect(router.currentRoute.value.name).toBe('customers'))
  })

  it('says plainly when the customer is not there, without a notification on top', async () => {
    vi.mocked(getCustomer).mockRejectedValue(new ApiError(404, 'not_found', 'No such customer in this workshop.'))
    await mountPage()

    expect(headingText(1)).toEqual(['We can’t find that customer'])
    expect(buttonByName('All customers').getAttribute('href')).toBe('/customers')
    expect(snackbarText()).toBe('')
  })
})
