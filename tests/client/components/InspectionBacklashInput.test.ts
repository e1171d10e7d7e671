// @vitest-environment happy-dom
import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import InspectionBacklashInput from '@/components/inspection/InspectionBacklashInput.vue'
import { starterChecks } from '@shared/inspection/starter-template'
import { buttonNamed, controlLabelled } from '../support/queries'
import { createTestVuetify } from '../support/vuetify'

// The starter limit is 45° at the prop flange, 1/8 of a 360° turn (common practice).
const backlash = starterChecks.find((c) => c.code === 'diff-backlash')!

function mountInput() {
  return mount(InspectionBacklashInput, { props: { check: backlash, recorded: null }, global: { plugins: [createTestVuetify()] } })
}

const chipText = (wrapper: ReturnType<typeof mountInput>) => wrapper.get('.v-chip').text()

describe('InspectionBacklashInput', () => {
  it('records 1/8 turn as 0.125 of a turn in one tap, shows it as 45° and suggests “All good” at the limit', async () => {
    const wrapper = mountInput()

    await buttonNamed(wrapper, '1/8 turn').trigger('click')

    expect(wrapper.emitted('record')).toEqual([[{ kind: 'backlash', value: '0.125', unit: 'turn' }]])
    expect(wrapper.text()).toContain('1/8 turn = 45° at the prop flange · limit 45°')
    expect(chipText(wrapper)).toBe('All good')
    expect(buttonNamed(wrapper, '1/8 turn').attributes('aria-pressed')).toBe('true')
  })

  it.each([
    ['1/16 turn', '0.0625', '22.5', 'All good'],
    ['1/4 turn', '0.25', '90', 'Fix soon'],
  ])('records %s as %s and shows %s°: %s', async (pick, value, degrees, word) => {
    const wrapper = mountInput()

    await buttonNamed(wrapper, pick).trigger('click')

    expect(wrapper.emitted('record')?.at(-1)).toEqual([{ kind: 'backlash', value, unit: 'turn' }])
    expect(wrapper.text()).toContain(`${degrees}° at the prop flange`)
    expect(chipText(wrapper)).toBe(word)
  })

  it('reads degrees either side of the limit: 45° is all good, 45.5° and 46° need fixing soon', async () => {
    const wrapper = mountInput()
    await controlLabelled(wrapper, 'Degrees').setValue(true)
    const field = controlLabelled(wrapper, 'Free play at the prop flange (degrees)')

    await field.setValue('45')
    expect(wrapper.text()).toContain('45° at the prop flange · limit 45°')
    expect(chipText(wrapper)).toBe('All good')

    await field.setValue('45.5')
    expect(chipText(wrapper)).toBe('Fix soon')

    await field.setValue('46')
    expect(chipText(wrapper)).toBe('Fix soon')
    expect(wrapper.emitted('record')).toBeUndefined()

    await buttonNamed(wrapper, 'Save').trigger('click')
    expect(wrapper.emitted('record')).toEqual([[{ kind: 'backlash', value: '46', unit: 'degrees' }]])
  })

  it('refuses a reading that is not a number', async () => {
    const wrapper = mountInput()
    await controlLabelled(wrapper, 'Degrees').setValue(true)
    await controlLabelled(wrapper, 'Free play at the prop flange (degrees)').setValue('lots')

    await buttonNamed(wrapper, 'Save').trigger('click')

    expect(wrapper.emitted('record')).toBeUndefined()
    expect(wrapper.text()).toContain('Enter a number, like 12 or 0.5')
  })
})
