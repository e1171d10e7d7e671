// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia } from 'pinia'
import { beforeEach, describe, expect, it, vi } from 'vitest'
import { createMemoryHistory, createRouter } from 'vue-router'
import { ApiError } from '@/api/http'
import { getHealth, getReady } from '@/api/system'
import StaffHomePage from '@/pages/staff/StaffHomePage.vue'
import { routes } from '@/router'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/system', () => ({ getHealth: vi.fn(), getReady: vi.fn() }))

async function mountPage() {
  const router = createRouter({ history: createMemoryHistory(), routes })
  await router.push({ name: 'staff-home' })
  const wrapper = mount(StaffHomePage, { global: { plugins: [createTestVuetify(), createPinia(), router] } })
  await flushPromises()
  return wrapper
}

function stateOf(wrapper: Awaited<ReturnType<typeof mountPage>>, name: string): string {
  const row = wrapper.findAll('dl > div').find((r) => r.get('dt').text() === name)
  if (!row) throw new Error(`No row for ${name}`)
  return row.get('dd').text()
}

function buttonNamed(wrapper: Awaited<ReturnType<typeof mountPage>>, name: string) {
  const button = wrapper.findAll('button').find((b) => b.text() === name)
  if (!button) throw new Error(`No button named ${name}`)
  return button
}

beforeEach(() => {
  vi.mocked(getHealth).mockReset()
  vi.mocked(getReady).mockReset()
})

describe('StaffHomePage', () => {
  it('shows that the server and the database are up', async () => {
    vi.mocked(getHealth).mockResolvedValue({ status: 'ok', uptimeSeconds: 5, version: '0.1.0' })
    vi.mocked(getReady).mockResolvedValue({ status: 'ready', database: 'ok' })

    const wrapper = await mountPage()

    expect(wrapper.get('h1').text()).toBe('Welcome to Tickover')
    expect(wrapper.get('[role="status"]').text()).toBe('Everything is running.')
    expect(stateOf(wrapper, 'Server')).toBe('Running')
    expect(stateOf(wrapper, 'Database')).toBe('Connected')
    expect(wrapper.text()).toContain('Server version 0.1.0')
  })

  it('says plainly when the server cannot be reached, and checks again on request', async () => {
    const unreachable = new ApiError(0, 'network_error', 'The server cannot be reached.')
    vi.mocked(getHealth).mockRejectedValue(unreachable)
    vi.mocked(getReady).mockRejectedValue(unreachable)

    const wrapper = await mountPage()

    expect(stateOf(wrapper, 'Server')).toBe('Not reachable')
    expect(stateOf(wrapper, 'Database')).toBe('Unknown while the server is not reachable')
    expect(wrapper.get('[role="status"]').text()).toMatch(/cannot reach its server/)

    vi.mocked(getHealth).mockResolvedValue({ status: 'ok', uptimeSeconds: 5, version: '0.1.0' })
    vi.mocked(getReady).mockResolvedValue({ status: 'ready', database: 'ok' })
    await buttonNamed(wrapper, 'Check again').trigger('click')
    await flushPromises()

    expect(getHealth).toHaveBeenCalledTimes(2)
    expect(stateOf(wrapper, 'Server')).toBe('Running')
  })

  it('tells the database apart from the server when only the database is down', async () => {
    vi.mocked(getHealth).mockResolvedValue({ status: 'ok', uptimeSeconds: 5, version: '0.1.0' })
    vi.mocked(getReady).mockRejectedValue(new ApiError(503, 'not_ready', 'The database cannot be reached right now.'))

    const wrapper = await mountPage()

    expect(stateOf(wrapper, 'Server')).toBe('Running')
    expect(stateOf(wrapper, 'Database')).toBe('Not reachable')
  })
})
