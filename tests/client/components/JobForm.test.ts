// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { VApp } from 'vuetify/components'
import type { ServerProblem } from '@/composables/field-errors'
import JobForm from '@/components/records/JobForm.vue'
import type { Job, JobInput } from '@shared/schemas/records'
import { buttonByName, chooseOption, fieldByLabel, fieldMessages, openDialog, typeInto } from '../support/dom'
import { job, testIds } from '../support/records'
import { createTestVuetify } from '../support/vuetify'

const technicianId = '2d9f7c74-3e50-4182-9c9d-4e6f80a12c33'
let unmount: (() => void) | undefined

function mountForm(opts: { job?: Job | null; problem?: ServerProblem | null } = {}) {
  const saved: JobInput[] = []
  const Host = defineComponent(
    () => () =>
      h(VApp, () =>
        h(JobForm, {
          open: true,
          job: opts.job ?? null,
          vehicle: opts.job ? null : { value: testIds.vehicle, title: 'HM15 KNX', subtitle: 'Brackwater Ridgeline 110' },
          vehicleOptions: [],
          searchingVehicles: false,
          technicianOptions: [{ value: technicianId, title: 'Pim Sayer', subtitle: 'Technician' }],
          saving: false,
          problem: opts.problem ?? null,
          onSave: (input: JobInput) => saved.push(input),
        }),
      ),
  )
  const wrapper = mount(Host, { attachTo: document.body, global: { plugins: [createTestVuetify()] } })
  unmount = () => wrapper.unmount()
  return saved
}

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
})

afterEach(() => {
  unmount?.()
  vi.unstubAllGlobals()
})

describe('JobForm', () => {
  it('asks for the concern in the customer’s words and will not promise before the booking', async () => {
    const saved = mountForm()
    await flushPromises()
    expect(fieldMessages(fieldByLabel('Customer’s concern'))).toMatch(/In the customer’s words/)
    typeInto(fieldByLabel('Booked in for'), '2025-03-10')
    typeInto(fieldByLabel('Promised back by'), '2025-03-07')
    await flushPromises()

    buttonByName('Open job', openDialog() ?? document).click()
    await flushPromises()

    expect(fieldMessages(fieldByLabel('Customer’s concern'))).toBe('Write down the customer’s concern in their words')
    expect(fieldMessages(fieldByLabel('Promised back by'))).toBe('The promised date cannot be before the booking date')
    expect(saved).toEqual([])
  })

  it('offers the statuses in plain words and sends the chosen one with the technician', async () => {
    const saved = mountForm()
    await flushPromises()
    typeInto(fieldByLabel('Customer’s concern'), '  Whine from the front at 40 mph  ')
    await chooseOption(fieldByLabel('Status'), 'Waiting for the customer', flushPromises)
    await chooseOption(fieldByLabel('Technician'), 'Pim Sayer', flushPromises)

    buttonByName('Open job', openDialog() ?? document).click()
    await flushPromises()

    expect(saved).toEqual([
      {
        vehicleId: testIds.vehicle,
        concern: 'Whine from the front at 40 mph',
        status: 'waiting_for_customer',
        technicianId,
        bookedFor: null,
        promisedFor: null,
      },
    ])
  })

  it('shows the server’s 422 on the technician field of a job being edited', async () => {
    mountForm({
      job: job({ technicianId, technicianName: 'Pim Sayer' }),
      problem: {
        status: 422,
        code: 'validation_failed',
        message: 'x',
        issues: [{ path: ['body', 'technicianId'], message: 'Choose an active member of this workshop' }],
      },
    })
    await flushPromises()

    expect(fieldMessages(fieldByLabel('Technician'))).toBe('Choose an active member of this workshop')
    expect(fieldMessages(fieldByLabel('Customer’s concern'))).toMatch(/In the customer’s words/)
  })

  it('keeps someone who has left on the job they had', async () => {
    mountForm({ job: job({ technicianId: testIds.customer, technicianName: 'Bo Leaver' }) })
    await flushPromises()

    const field = fieldByLabel('Technician').closest('.v-field')
    expect(field?.textContent).toContain('Bo Leaver (left)')
  })
})
