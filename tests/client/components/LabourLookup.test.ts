// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { searchLabour } from '@/api/catalogue'
import { ApiError } from '@/api/http'
import LabourLookup from '@/components/catalogue/LabourLookup.vue'
import { useNotificationsStore } from '@/stores/notifications'
import type { LabourOperation } from '@shared/schemas/catalogue'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/catalogue', () => ({ searchLabour: vi.fn() }))

/** Made-up operations for the component to show; the figures are test inputs. */
function operation(code: string, name: string, extra: Partial<LabourOperation> = {}): LabourOperation {
  return {
    id: `00000000-0000-4000-8000-${code.padStart(12, '0').slice(-12)}`,
    code,
    name,
    synonyms: [],
    system: 'prop_shafts',
    vehicleGroups: [],
    side: 'none',
    bookHours: '1.5',
    category: 'standard',
    notes: null,
    accessSteps: [],
    accessHours: '0',
    rateMinor: 8000,
    priceMinor: 12000,
    currency: 'GBP',
    archived: false,
    ...extra,
  }
}

const uj = operation('111', 'Replace rear prop shaft universal joint')
const cv = operation('222', 'Replace CV joint', {
  system: 'front_axle',
  side: 'left',
  bookHours: '3.5',
  priceMinor: 28000,
  accessSteps: [{ code: 'HUB', name: 'Front hub off and on', hours: '1', includes: [] }],
  accessHours: '1',
})

function mountLookup(props: Record<string, unknown> = {}) {
  const pinia = createPinia()
  setActivePinia(pinia)
  return mount(LabourLookup, { props, global: { plugins: [createTestVuetify(), pinia] }, attachTo: document.body })
}

async function type(wrapper: ReturnType<typeof mountLookup>, text: string) {
  await wrapper.get('input').setValue(text)
}

beforeEach(() => {
  vi.useFakeTimers()
  vi.mocked(searchLabour).mockReset()
  vi.mocked(searchLabour).mockResolvedValue({ items: [uj, cv], total: 2, page: 1, pageSize: 8 })
})

afterEach(() => {
  vi.useRealTimers()
  document.body.innerHTML = ''
})

describe('LabourLookup', () => {
  it('waits for a 200 ms pause in typing and then asks once, with the newest text', async () => {
    const wrapper = mountLookup()
    await type(wrapper, 'u')
    await type(wrapper, 'uj')
    await vi.advanceTimersByTimeAsync(199)
    expect(searchLabour).not.toHaveBeenCalled()

    await vi.advanceTimersByTimeAsync(1)
    expect(searchLabour).toHaveBeenCalledTimes(1)
    expect(searchLabour).toHaveBeenCalledWith(expect.objectContaining({ q: 'uj', page: 1 }))
  })

  it('does not ask for a single letter', async () => {
    const wrapper = mountLookup()
    await type(wrapper, 'u')
    await vi.advanceTimersByTimeAsync(500)
    expect(searchLabour).not.toHaveBeenCalled()
  })

  it('passes the vehicle group and side it was given', async () => {
    const wrapper = mountLookup({ vehicleGroup: 'coil-sprung-live-axle', side: 'left' })
    await type(wrapper, 'cv joint')
    await vi.advanceTimersByTimeAsync(200)
    expect(searchLabour).toHaveBeenCalledWith(
      expect.objectContaining({ q: 'cv joint', vehicleGroup: 'coil-sprung-live-axle', side: 'left' }),
    )
  })

  it('shows each result with hours, category, price at the rate and its access steps', async () => {
    const wrapper = mountLookup()
    await type(wrapper, 'joint')
    await vi.advanceTimersByTimeAsync(200)
    await flushPromises()

    const options = wrapper.findAll('[role="option"]')
    expect(options).toHaveLength(2)
    const second = options[1]?.text() ?? ''
    expect(second).toContain('Replace CV joint')
    expect(second).toContain('3.5 h')
    expect(second).toContain('Standard')
    expect(second).toContain('£280.00')
    expect(second).toContain('Left')
    expect(second).toContain('Access included: Front hub off and on (1 h)')
    expect(wrapper.get('[role="status"]').text()).toBe('2 operations match.')
  })

  it('says when the rate is not set rather than showing a price of nothing', async () => {
    vi.mocked(searchLabour).mockResolvedValue({
      items: [operation('333', 'Diagnose noise', { priceMinor: null, rateMinor: null })],
      total: 1,
      page: 1,
      pageSize: 8,
    })
    const wrapper = mountLookup()
    await type(wrapper, 'noise')
    await vi.advanceTimersByTimeAsync(200)
    await flushPromises()
    expect(wrapper.get('[role="option"]').text()).toContain('Rate not set')
  })

  it('emits select with the operation that was clicked', async () => {
    const wrapper = mountLookup()
    await type(wrapper, 'joint')
    await vi.advanceTimersByTimeAsync(200)
    await flushPromises()
    await wrapper.findAll('[role="option"]')[1]?.trigger('click')
    expect(wrapper.emitted('select')).toEqual([[cv]])
  })

  it('moves through the results with the arrow keys and chooses with Enter', async () => {
    const wrapper = mountLookup()
    const input = wrapper.get('input')
    await type(wrapper, 'joint')
    await vi.advanceTimersByTimeAsync(200)
    await flushPromises()

    expect(input.attributes('aria-expanded')).toBe('true')
    const first = wrapper.findAll('[role="option"]')[0]
    expect(input.attributes('aria-activedescendant')).toBe(first?.attributes('id'))

    await input.trigger('keydown', { key: 'ArrowDown' })
    const second = wrapper.findAll('[role="option"]')[1]
    expect(second?.attributes('aria-selected')).toBe('true')
    expect(input.attributes('aria-activedescendant')).toBe(second?.attributes('id'))

    await input.trigger('keydown', { key: 'ArrowDown' })
    expect(wrapper.findAll('[role="option"]')[0]?.attributes('aria-selected')).toBe('true')

    await input.trigger('keydown', { key: 'ArrowUp' })
    await input.trigger('keydown', { key: 'Enter' })
    expect(wrapper.emitted('select')).toEqual([[cv]])
    expect(input.attributes('aria-expanded')).toBe('false')
  })

  it('shows only the newest answer when an older one arrives late', async () => {
    let answerOld: (value: Awaited<ReturnType<typeof searchLabour>>) => void = () => {}
    vi.mocked(searchLabour)
      .mockImplementationOnce(() => new Promise((resolve) => (answerOld = resolve)))
      .mockResolvedValueOnce({ items: [cv], total: 1, page: 1, pageSize: 8 })
    const wrapper = mountLookup()
    await type(wrapper, 'jo')
    await vi.advanceTimersByTimeAsync(200)
    await type(wrapper, 'cv joint')
    await vi.advanceTimersByTimeAsync(200)
    await flushPromises()
    answerOld({ items: [uj, cv], total: 2, page: 1, pageSize: 8 })
    await flushPromises()

    expect(wrapper.findAll('[role="option"]').map((o) => o.text())).toEqual([expect.stringContaining('Replace CV joint')])
  })

  it('says plainly when nothing matches', async () => {
    vi.mocked(searchLabour).mockResolvedValue({ items: [], total: 0, page: 1, pageSize: 8 })
    const wrapper = mountLookup()
    await type(wrapper, 'carburettor')
    await vi.advanceTimersByTimeAsync(200)
    await flushPromises()
    expect(wrapper.find('[role="option"]').exists()).toBe(false)
    expect(wrapper.get('[role="status"]').text()).toBe('No operations match “carburettor”.')
  })

  it('reports a failed search through the notification queue', async () => {
    vi.mocked(searchLabour).mockRejectedValue(new ApiError(0, 'network_error', 'The server cannot be reached.'))
    const wrapper = mountLookup()
    await type(wrapper, 'uj')
    await vi.advanceTimersByTimeAsync(200)
    await flushPromises()
    expect(useNotificationsStore().queue).toMatchObject([{ kind: 'error', text: 'The server cannot be reached.' }])
  })
})
