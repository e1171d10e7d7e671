// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia } from 'pinia'
import { beforeEach, describe, expect, it, vi } from 'vitest'
import { createMemoryHistory, createRouter } from 'vue-router'
import { getCheckTemplate, saveCheckTemplate } from '@/api/check-templates'
import { ApiError } from '@/api/http'
import CheckTemplateEditPage from '@/pages/staff/CheckTemplateEditPage.vue'
import { routes } from '@/router'
import { starterTemplate } from '@shared/inspection/starter-template'
import type { CheckTemplate, CheckTemplateInput } from '@shared/schemas/inspections'
import { buttonNamed, controlLabelled } from '../support/queries'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/check-templates', () => ({
  listCheckTemplates: vi.fn(),
  getCheckTemplate: vi.fn(),
  copyCheckTemplate: vi.fn(),
  saveCheckTemplate: vi.fn(),
  archiveCheckTemplate: vi.fn(),
}))

const ID = '55555555-5555-4555-8555-555555555555'
const copy: CheckTemplate = {
  id: ID,
  name: 'Coil-sprung axles',
  vehicleGroup: 'coil-sprung-live-axle',
  definition: starterTemplate.definition,
  basedOnId: '66666666-6666-4666-8666-666666666666',
  archived: false,
  updatedAt: '2025-05-01T08:00:00Z',
}

async function mountPage() {
  const router = createRouter({ history: createMemoryHistory(), routes })
  await router.push({ name: 'check-template', params: { id: ID } })
  const wrapper = mount(CheckTemplateEditPage, {
    props: { id: ID },
    attachTo: document.body,
    global: { plugins: [createTestVuetify(), createPinia(), router] },
  })
  await flushPromises()
  return wrapper
}

async function openCheck(wrapper: Awaited<ReturnType<typeof mountPage>>, prompt: string) {
  await buttonNamed(wrapper, new RegExp(`^${prompt.replace(/[()]/g, '\\$&')}`)).trigger('click')
  await flushPromises()
}

beforeEach(() => {
  vi.mocked(getCheckTemplate).mockReset().mockResolvedValue(copy)
  vi.mocked(saveCheckTemplate).mockReset()
  document.body.innerHTML = ''
})

describe('CheckTemplateEditPage', () => {
  it('checks the template with the shared schema and shows the message on the field, without sending it', async () => {
    const wrapper = await mountPage()
    await openCheck(wrapper, 'Oil at the swivel housing seal')

    await controlLabelled(wrapper, 'Prompt shown to the technician').setValue('')
    await wrapper.get('form').trigger('submit')
    await flushPromises()

    expect(saveCheckTemplate).not.toHaveBeenCalled()
    expect(wrapper.text()).toContain('One thing needs changing before the template can be saved')
    const field = controlLabelled(wrapper, 'Prompt shown to the technician').element.closest('.v-input')
    expect(field?.textContent).toContain('Fill this in')
  })

  it('shows the server’s 422 on the field it names, opening that check', async () => {
    vi.mocked(saveCheckTemplate).mockRejectedValue(
      new ApiError(422, 'validation_failed', 'Check the highlighted fields.', [
        { path: ['body', 'definition', 'checks', 11, 'input', 'limitDegrees'], message: 'Enter a number, like 12 or 0.5' },
      ]),
    )
    const wrapper = await mountPage()

    await wrapper.get('form').trigger('submit')
    await flushPromises()

    const field = controlLabelled(wrapper, 'Backlash limit at the prop flange (degrees)').element.closest('.v-input')
    expect(field?.textContent).toContain('Enter a number, like 12 or 0.5')
  })

  it('saves a renamed outcome with the rest of the template, and an empty vehicle group as none', async () => {
    vi.mocked(saveCheckTemplate).mockImplementation((_id, input) =>
      Promise.resolve({ ...copy, ...input, vehicleGroup: input.vehicleGroup ?? null }),
    )
    const wrapper = await mountPage()
    await openCheck(wrapper, 'Oil at the swivel housing seal')

    await controlLabelled(wrapper, 'Outcome 2').setValue('Misting')
    await controlLabelled(wrapper, 'Vehicle group (optional)').setValue('  ')
    await wrapper.get('form').trigger('submit')
    await flushPromises()

    const [, sent] = vi.mocked(saveCheckTemplate).mock.calls[0] as [string, CheckTemplateInput]
    expect(sent.vehicleGroup).toBeNull()
    expect(sent.definition.checks).toHaveLength(starterTemplate.definition.checks.length)
    expect(sent.definition.checks[0]?.input).toEqual({
      kind: 'choice',
      options: [
        { value: 'none', label: 'Dry', severity: 'ok' },
        { value: 'weep', label: 'Misting', severity: 'watch' },
        { value: 'leak', label: 'Wet leak', severity: 'soon' },
      ],
    })
  })
})
