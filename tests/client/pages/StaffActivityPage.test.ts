// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { createMemoryHistory, createRouter } from 'vue-router'
import { VApp } from 'vuetify/components'
import { listAuditEvents } from '@/api/audit'
import { listStaff } from '@/api/staff'
import StaffActivityPage from '@/pages/staff/StaffActivityPage.vue'
import { routes } from '@/router'
import { useAuthStore } from '@/stores/auth'
import type { AuditEvent } from '@shared/schemas/audit'
import type { StaffMember } from '@shared/schemas/staff'
import { chooseOption, fieldByLabel, fieldMessages, typeInto } from '../support/dom'
import { staffPrincipal } from '../support/principals'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/audit', () => ({ listAuditEvents: vi.fn() }))
vi.mock('@/api/staff', () => ({ listStaff: vi.fn() }))

const owner = staffPrincipal('owner')
const technician = staffPrincipal('technician')
const people: StaffMember[] = [owner, technician].map((p) => ({
  id: p.id,
  name: p.name,
  email: p.email,
  role: p.role,
  active: true,
  lastSignInAt: null,
  createdAt: '2025-01-06T09:00:00.000Z',
}))

const roleChange: AuditEvent = {
  id: '41',
  action: 'staff.role_changed',
  actorKind: 'staff',
  actorId: owner.id,
  actorName: owner.name,
  subjectType: 'staff',
  subjectId: technician.id,
  details: { from: 'technician', to: 'owner' },
  ip: '192.0.2.10',
  userAgent: 'test',
  // 12:00 UTC on 1 July is 13:00 in London (British Summer Time, UTC+1).
  createdAt: '2025-07-01T12:00:00.000Z',
}

let unmount: (() => void) | undefined

async function mountPage() {
  const pinia = createPinia()
  setActivePinia(pinia)
  const auth = useAuthStore()
  auth.user = owner
  auth.hasLoaded = true
  const router = createRouter({ history: createMemoryHistory(), routes })
  await router.push({ name: 'activity' })
  const Host = defineComponent(() => () => h(VApp, () => h(StaffActivityPage)))
  const wrapper = mount(Host, { attachTo: document.body, global: { plugins: [createTestVuetify(), pinia, router] } })
  unmount = () => wrapper.unmount()
  await flushPromises()
  return wrapper
}

function lastQuery() {
  return vi.mocked(listAuditEvents).mock.lastCall?.[0]
}

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
  vi.mocked(listAuditEvents).mockReset()
  vi.mocked(listAuditEvents).mockResolvedValue({ items: [roleChange], total: 1, page: 1, pageSize: 25 })
  vi.mocked(listStaff).mockReset()
  vi.mocked(listStaff).mockResolvedValue(people)
})

afterEach(() => {
  unmount?.()
  unmount = undefined
  vi.unstubAllGlobals()
})

describe('activity log', () => {
  it('first asks for the newest 25 events, with no filters', async () => {
    await mountPage()

    expect(listAuditEvents).toHaveBeenCalledOnce()
    expect(lastQuery()).toEqual({ page: 1, pageSize: 25, sortBy: 'createdAt', sortDesc: true })
  })

  it("shows when in the workshop's time, who, what in plain words, readable details and the IP", async () => {
    const wrapper = await mountPage()

    const cells = wrapper
      .findAll('tbody tr')
      .at(0)
      ?.findAll('td')
      .map((td) => td.text())
    expect(cells).toEqual(['1 Jul 2025, 13:00', 'Wren Castell', 'Role changed', 'Pim Sayer: technician → owner', '192.0.2.10'])
    expect(wrapper.findAll('thead th').map((th) => th.text())).toEqual(['Time', 'Who', 'What', 'Details', 'IP address'])
  })

  it('asks for only the chosen kind of event, by its code', async () => {
    await mountPage()

    await chooseOption(fieldByLabel('What happened'), 'Role changed', flushPromises)

    expect(lastQuery()).toMatchObject({ action: 'staff.role_changed', page: 1 })
  })

  it('asks for one person, chosen by name, by their id', async () => {
    await mountPage()

    await chooseOption(fieldByLabel('Who did it'), 'Pim Sayer', flushPromises)

    expect(lastQuery()).toMatchObject({ actorId: technician.id })
  })

  it('passes the dates as the days chosen, and leaves out a cleared one', async () => {
    await mountPage()

    typeInto(fieldByLabel('From'), '2025-06-01')
    await flushPromises()
    typeInto(fieldByLabel('To'), '2025-06-30')
    await flushPromises()
    expect(lastQuery()).toMatchObject({ from: '2025-06-01', to: '2025-06-30' })

    typeInto(fieldByLabel('From'), '')
    await flushPromises()
    expect(lastQuery()).not.toHaveProperty('from', expect.anything())
    expect(lastQuery()?.to).toBe('2025-06-30')
  })

  it('does not ask at all for an end date before the start date, and says why', async () => {
    await mountPage()
    typeInto(fieldByLabel('From'), '2025-06-30')
    await flushPromises()
    const calls = vi.mocked(listAuditEvents).mock.calls.length

    typeInto(fieldByLabel('To'), '2025-06-01')
    await flushPromises()

    expect(vi.mocked(listAuditEvents).mock.calls.length).toBe(calls)
    expect(fieldMessages(fieldByLabel('To'))).toBe('Pick a date on or after "From"')
  })

  it('goes back to the first page when a filter changes', async () => {
    vi.mocked(listAuditEvents).mockResolvedValue({ items: [roleChange], total: 60, page: 1, pageSize: 25 })
    const wrapper = await mountPage()

    await wrapper.get('button[aria-label="Next page"]').trigger('click')
    await flushPromises()
    expect(lastQuery()).toMatchObject({ page: 2 })

    await chooseOption(fieldByLabel('What happened'), 'Signed in', flushPromises)
    expect(lastQuery()).toMatchObject({ page: 1, action: 'sign_in.succeeded' })
  })

  it('sorts by what happened when that heading is chosen', async () => {
    const wrapper = await mountPage()

    const what = wrapper.findAll('thead th').find((th) => th.text() === 'What')
    await what!.trigger('click')
    await flushPromises()

    expect(lastQuery()).toMatchObject({ sortBy: 'action', sortDesc: false })
  })
})
