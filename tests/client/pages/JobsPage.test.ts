// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { createMemoryHistory, createRouter } from 'vue-router'
import { VApp } from 'vuetify/components'
import { listJobs } from '@/api/jobs'
import JobsPage from '@/pages/staff/JobsPage.vue'
import { routes } from '@/router'
import { useAuthStore } from '@/stores/auth'
import type { StaffRole } from '@shared/auth/policy'
import { chooseOption, fieldByLabel, queryButtonByName } from '../support/dom'
import { staffPrincipal } from '../support/principals'
import { job, page } from '../support/records'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/jobs', () => ({ listJobs: vi.fn(), getJob: vi.fn(), createJob: vi.fn(), updateJob: vi.fn(), deleteJob: vi.fn() }))

let unmount: (() => void) | undefined

async function mountPage(role: StaffRole) {
  const pinia = createPinia()
  setActivePinia(pinia)
  const auth = useAuthStore()
  auth.user = staffPrincipal(role)
  auth.hasLoaded = true
  const router = createRouter({ history: createMemoryHistory(), routes })
  await router.push({ name: 'jobs' })
  const Host = defineComponent(() => () => h(VApp, () => h(JobsPage)))
  const wrapper = mount(Host, { attachTo: document.body, global: { plugins: [createTestVuetify(), pinia, router] } })
  unmount = () => wrapper.unmount()
  await flushPromises()
  return wrapper
}

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
  vi.mocked(listJobs).mockReset()
  vi.mocked(listJobs).mockResolvedValue(page([job({ status: 'waiting_for_customer' })], 1))
})

afterEach(() => {
  unmount?.()
  vi.unstubAllGlobals()
})

describe('jobs page', () => {
  it('says each job’s status in words, beside its own icon', async () => {
    const wrapper = await mountPage('advisor')

    const chip = wrapper.get('tbody .v-chip')
    expect(chip.text()).toBe('Waiting for the customer')
    expect(chip.find('svg').exists()).toBe(true)
    expect(wrapper.get('tbody').text()).toContain('Clunk from the back when pulling away')
  })

  it('filters by status, named in plain words', async () => {
    await mountPage('advisor')

    await chooseOption(fieldByLabel('Status'), 'Work under way', flushPromises)

    expect(listJobs).toHaveBeenLastCalledWith(expect.objectContaining({ status: 'in_work', page: 1 }))
  })

  it('lets a technician list their own jobs, and read but not open new ones', async () => {
    await mountPage('technician')

    fieldByLabel('Assigned to me').click()
    await flushPromises()

    expect(listJobs).toHaveBeenLastCalledWith(expect.objectContaining({ technicianId: staffPrincipal('technician').id }))
    expect(queryButtonByName('New job')).toBeNull()
  })
})
