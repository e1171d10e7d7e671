// @vitest-environment happy-dom
import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import InspectionSafetyStep from '@/components/inspection/InspectionSafetyStep.vue'
import { buttonNamed, controlLabelled } from '../support/queries'
import { createTestVuetify } from '../support/vuetify'

function mountStep() {
  return mount(InspectionSafetyStep, {
    props: { previous: null, saving: false, problem: null },
    global: { plugins: [createTestVuetify()] },
  })
}

const confirmations = [
  'The stands are on firm, level ground',
  'The stands are at proper lifting or support points',
  'The wheels left on the ground are chocked',
  'Nothing is held up by a jack alone',
]

async function fill(wrapper: ReturnType<typeof mountStep>, values: Record<string, string>) {
  for (const [label, value] of Object.entries(values)) await controlLabelled(wrapper, label).setValue(value)
}

const submit = (wrapper: ReturnType<typeof mountStep>) => buttonNamed(wrapper, 'Confirm and start the checks')

describe('InspectionSafetyStep', () => {
  it('states the cautions in full and defers to training and local rules', () => {
    const text = mountStep().text()

    expect(text).toContain('firm, level ground, placed at proper lifting or support points')
    expect(text).toContain('Chock the wheels that stay on the ground')
    expect(text).toContain('Never work under a vehicle held up only by a jack')
    expect(text).toContain('local regulations and the vehicle maker’s procedure')
    expect(text).toContain('This app advises — your training and local rules decide.')
  })

  it('stays blocked until all four points are confirmed, even with well-rated stands', async () => {
    const wrapper = mountStep()
    await fill(wrapper, { 'Stand rating (kg)': '3000', 'Number of stands under the vehicle': '2', 'Axle load (kg)': '1800' })

    for (const label of confirmations.slice(0, 3)) await controlLabelled(wrapper, label).setValue(true)
    expect(submit(wrapper).attributes('disabled')).toBeDefined()
    expect(wrapper.text()).toContain('Confirm all four points above to carry on.')

    await controlLabelled(wrapper, confirmations[3]!).setValue(true)
    expect(submit(wrapper).attributes('disabled')).toBeUndefined()
  })

  it('shows the coverage verdict as the figures are typed and blocks stands rated below the axle load', async () => {
    const wrapper = mountStep()
    for (const label of confirmations) await controlLabelled(wrapper, label).setValue(true)

    // Two stands rated 1000 kg each carry 2000 kg together: not enough for a 2500 kg axle.
    await fill(wrapper, { 'Stand rating (kg)': '1000', 'Number of stands under the vehicle': '2', 'Axle load (kg)': '2500' })
    const status = wrapper.get('[role="status"]')
    expect(status.text()).toContain('Stands not rated for the load')
    expect(status.text()).toContain('rated 2000 kg together, less than the 2500 kg axle load')
    expect(submit(wrapper).attributes('disabled')).toBeDefined()

    await fill(wrapper, { 'Stand rating (kg)': '1500' })
    expect(status.text()).toContain('Stands rated for the load')
    expect(status.text()).toContain('rated 3000 kg together, above the 2500 kg axle load')
    expect(submit(wrapper).attributes('disabled')).toBeUndefined()
  })

  it('counts a rating per pair once for every two stands', async () => {
    const wrapper = mountStep()
    for (const label of confirmations) await controlLabelled(wrapper, label).setValue(true)
    await fill(wrapper, { 'Stand rating (kg)': '1500', 'Number of stands under the vehicle': '2', 'Axle load (kg)': '2500' })
    expect(submit(wrapper).attributes('disabled')).toBeUndefined()

    await controlLabelled(wrapper, 'Per pair').setValue(true)

    expect(wrapper.get('[role="status"]').text()).toContain('rated 1500 kg together, less than the 2500 kg axle load')
    expect(submit(wrapper).attributes('disabled')).toBeDefined()
  })

  it('sends the confirmed check with whole-number figures', async () => {
    const wrapper = mountStep()
    for (const label of confirmations) await controlLabelled(wrapper, label).setValue(true)
    await controlLabelled(wrapper, 'Per pair').setValue(true)
    await fill(wrapper, { 'Stand rating (kg)': '3000', 'Number of stands under the vehicle': '2', 'Axle load (kg)': '1800' })

    await wrapper.get('form').trigger('submit')

    expect(wrapper.emitted('confirm')).toEqual([
      [
        {
          standsOnFirmLevelGround: true,
          atLiftingPoints: true,
          wheelsChocked: true,
          notOnJackAlone: true,
          standCapacityKg: 3000,
          capacityBasis: 'per-pair',
          standCount: 2,
          axleLoadKg: 1800,
        },
      ],
    ])
  })

  it('shows the server’s refusal on the stand rating field', async () => {
    const wrapper = mountStep()
    await wrapper.setProps({
      problem: {
        status: 422,
        code: 'validation_failed',
        message: 'Check the highlighted fields.',
        issues: [{ path: ['body', 'standCapacityKg'], message: 'Use stands with a higher rating before going under the vehicle.' }],
      },
    })

    expect(wrapper.text()).toContain('Use stands with a higher rating before going under the vehicle.')
  })
})
