// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { createMemoryHistory, createRouter } from 'vue-router'
import { VApp } from 'vuetify/components'
import { createCustomer, listCustomers } from '@/api/customers'
import { ApiError } from '@/api/http'
import CustomersPage from '@/pages/staff/CustomersPage.vue'
import { routes } from '@/router'
import { useAuthStore } from '@/stores/auth'
import type { StaffRole } from '@shared/auth/policy'
import { buttonByName, fieldByLabel, fieldMessages, openDialog, queryButtonByName, typeInto } from '../support/dom'
import { staffPrincipal } from '../support/principals'
import { customer, page, testIds } from '../support/records'
import { setViewport } from '../support/viewport'
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

let unmount: (() => void) | undefined

async function mountPage(role: StaffRole = 'advisor') {
  const pinia = createPinia()
  setActivePinia(pinia)
  const auth = useAuthStore()
  auth.user = staffPrincipal(role)
  auth.hasLoaded = true
  const router = createRouter({ history: createMemoryHistory(), routes })
  await router.push({ name: 'customers' })
  const Host = defineComponent(() => () => h(VApp, () => h(CustomersPage)))
  const wrapper = mount(Host, { attachTo: document.body, global: { plugins: [createTestVuetify(), pinia, router] } })
  unmount = () => wrapper.unmount()
  await flushPromises()
  return { wrapper, router }
}

const people = [
  customer(),
  customer({ id: testIds.otherCustomer, name: 'Ives Marlow', email: null, phone: '07700 900456', vehicleCount: 0 }),
]

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
  vi.mocked(listCustomers).mockReset()
  vi.mocked(createCustomer).mockReset()
  vi.mocked(listCustomers).mockResolvedValue(page(people, 2))
})

afterEach(() => {
  unmount?.()
  vi.useRealTimers()
  vi.unstubAllGlobals()
  setViewport(1024, 768)
})

describe('customers page', () => {
  it('lists customers from one request, each linking to their page', async () => {
    const { wrapper } = await mountPage()

    expect(listCustomers).toHaveBeenCalledOnce()
    const rows = wrapper.findAll('tbody tr')
    expect(rows).toHaveLength(2)
    expect(buttonByName('Maris Fenwick').getAttribute('href')).toBe(`/customers/${testIds.customer}`)
    expect(rows[1]?.text()).toContain('07700 900456')
    expect(wrapper.find('table').text()).toContain('Name')
  })

  it('searches 300 ms after the last key, from the first page', async () => {
    await mountPage()
    vi.useFakeTimers()
    const search = fieldByLabel('Search customers')

    typeInto(search, 'iv')
    await vi.advanceTimersByTimeAsync(200)
    typeInto(search, 'ives')
    await vi.advanceTimersByTimeAsync(299)
    expect(listCustomers).toHaveBeenCalledOnce()

    await vi.advanceTimersByTimeAsync(1)
    expect(listCustomers).toHaveBeenCalledTimes(2)
    expect(listCustomers).toHaveBeenLastCalledWith(expect.objectContaining({ q: 'ives', page: 1 }))
  })

  it('shows archived customers when asked', async () => {
    await mountPage()

    fieldByLabel('Show archived').click()
    await flushPromises()

    expect(listCustomers).toHaveBeenLastCalledWith(expect.objectContaining({ archived: true, page: 1 }))
    expect(document.body.textContent).toContain('Showing archived records only')
  })

  it('sorts on the server when a sortable heading is chosen', async () => {
    const { wrapper } = await mountPage()

    const added = wrapper.findAll('th').find((th) => th.text() === 'Added')
    await added?.trigger('click')
    await flushPromises()

    expect(listCustomers).toHaveBeenLastCalledWith(expect.objectContaining({ sortBy: 'createdAt', sortDesc: false }))
  })

  it('adds a customer, showing the server’s 422 on the field it names', async () => {
    vi.mocked(createCustomer).mockRejectedValue(
      new ApiError(422, 'validation_failed', 'Some of the details are not right.', [
        { path: ['body', 'phone'], message: 'That number is not one we can use' },
      ]),
    )
    await mountPage()

    buttonByName('New customer').click()
    await flushPromises()
    typeInto(fieldByLabel('Name'), 'Ives Marlow')
    typeInto(fieldByLabel('Phone number'), '07700 900456')
    fieldByLabel('By e-mail').click()
    fieldByLabel('By phone call').click()
    await flushPromises()
    buttonByName('Add customer', openDialog() ?? document).click()
    await flushPromises()

    expect(createCustomer).toHaveBeenCalledWith(
      expect.objectContaining({ name: 'Ives Marlow', phone: '07700 900456', contactByEmail: false, contactByPhone: true }),
    )
    expect(fieldMessages(fieldByLabel('Phone number'))).toBe('That number is not one we can use')
    expect(openDialog()).not.toBeNull()
  })

  it('offers no way to add customers to a role that may not', async () => {
    await mountPage('technician')

    expect(queryButtonByName('New customer')).toBeNull()
  })

  it('shows each customer as one card on a 390 px phone', async () => {
    setViewport(390, 844)
    const { wrapper } = await mountPage()

    const cards = wrapper.findAll('tr.records-table__card')
    expect(cards).toHaveLength(2)
    expect(cards[0]?.text()).toContain('Maris Fenwick')
    expect(cards[0]?.text()).toContain('1 vehicle')
    expect(cards[1]?.text()).toContain('0 vehicles')
  })
})
