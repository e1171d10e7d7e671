// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h, ref } from 'vue'
import { VApp } from 'vuetify/components'
import type { ServerProblem } from '@/composables/field-errors'
import VehicleForm from '@/components/records/VehicleForm.vue'
import type { VehicleInput } from '@shared/schemas/records'
import { buttonByName, fieldByLabel, fieldMessages, openDialog, typeInto } from '../support/dom'
import { testIds } from '../support/records'
import { createTestVuetify } from '../support/vuetify'

let unmount: (() => void) | undefined

function mountForm(problem: ServerProblem | null = null) {
  const saved: VehicleInput[] = []
  const current = ref<ServerProblem | null>(problem)
  const Host = defineComponent(
    () => () =>
      h(VApp, () =>
        h(VehicleForm, {
          open: true,
          vehicle: null,
          keeperOptions: [{ value: testIds.customer, title: 'Maris Fenwick' }],
          searchingKeepers: false,
          saving: false,
          problem: current.value,
          onSave: (input: VehicleInput) => saved.push(input),
        }),
      ),
  )
  const wrapper = mount(Host, { attachTo: document.body, global: { plugins: [createTestVuetify()] } })
  unmount = () => wrapper.unmount()
  return { saved, problem: current }
}

async function submit(): Promise<void> {
  buttonByName('Add vehicle', openDialog() ?? document).click()
  await flushPromises()
}

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
})

afterEach(() => {
  unmount?.()
  vi.unstubAllGlobals()
})

describe('VehicleForm', () => {
  it('puts the server’s 422 issues on the matching fields', async () => {
    mountForm({
      status: 422,
      code: 'validation_failed',
      message: 'Choose a customer of this workshop.',
      issues: [
        { path: ['body', 'customerId'], message: 'Choose a customer of this workshop' },
        { path: ['body', 'vin'], message: 'A VIN has exactly 17 characters' },
      ],
    })
    await flushPromises()

    expect(fieldMessages(fieldByLabel('Keeper'))).toBe('Choose a customer of this workshop')
    expect(fieldMessages(fieldByLabel('VIN (chassis number)'))).toBe('A VIN has exactly 17 characters')
    expect(fieldMessages(fieldByLabel('Make'))).toBe('')
  })

  it('clears a server issue from a field once it is edited', async () => {
    mountForm({ status: 422, code: 'validation_failed', message: 'x', issues: [{ path: ['body', 'make'], message: 'Enter the make' }] })
    await flushPromises()

    typeInto(fieldByLabel('Make'), 'Brackwater')
    await flushPromises()

    expect(fieldMessages(fieldByLabel('Make'))).toBe('')
  })

  it('upper-cases the VIN as it is typed and explains ISO 3779 under it', async () => {
    mountForm()
    await flushPromises()
    const vin = fieldByLabel('VIN (chassis number)')

    typeInto(vin, 'hlw4x4tst0000004o')
    await flushPromises()

    expect(vin.value).toBe('HLW4X4TST0000004O')
    expect(fieldMessages(vin)).toMatch(/ISO 3779/)
    expect(fieldMessages(vin)).toMatch(/never has I, O or Q/)
  })

  it('refuses a VIN with an O before asking the server', async () => {
    const { saved } = mountForm()
    await flushPromises()
    typeInto(fieldByLabel('Registration'), 'hm15 knx')
    typeInto(fieldByLabel('VIN (chassis number)'), 'HLW4X4TST0000004O')
    typeInto(fieldByLabel('Make'), 'Brackwater')
    typeInto(fieldByLabel('Model'), 'Ridgeline 110')
    await flushPromises()

    await submit()

    expect(fieldMessages(fieldByLabel('VIN (chassis number)'))).toBe('A VIN never contains the letters I, O or Q (ISO 3779)')
    expect(fieldMessages(fieldByLabel('Keeper'))).toBe('Choose the vehicle’s keeper')
    expect(saved).toEqual([])
  })

  it('sends what the shared schema makes of a valid form', async () => {
    const { saved } = mountForm()
    await flushPromises()
    typeInto(fieldByLabel('Registration'), 'hm15 knx')
    typeInto(fieldByLabel('VIN (chassis number)'), 'hlw4x4tst00000042')
    typeInto(fieldByLabel('Make'), 'Brackwater')
    typeInto(fieldByLabel('Model'), 'Ridgeline 110')
    typeInto(fieldByLabel('Year'), '2015')
    typeInto(fieldByLabel('Odometer reading'), '98000')
    await flushPromises()
    // Picking the keeper goes through the autocomplete's menu; its options come from the page.
    fieldByLabel('Keeper')
      .closest('.v-field')
      ?.dispatchEvent(new MouseEvent('mousedown', { bubbles: true }))
    await flushPromises()
    const option = [...document.querySelectorAll<HTMLElement>('[role="option"]')].find((o) => o.textContent?.includes('Maris Fenwick'))
    option?.click()
    await flushPromises()

    await submit()

    expect(saved).toEqual([
      {
        customerId: testIds.customer,
        registration: 'HM15 KNX',
        vin: 'HLW4X4TST00000042',
        make: 'Brackwater',
        model: 'Ridgeline 110',
        year: 2015,
        odometer: 98000,
        odometerUnit: 'mi',
        vehicleGroup: null,
      },
    ])
  })
})
