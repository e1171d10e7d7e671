// @vitest-environment happy-dom
import { mount } from '@vue/test-utils'
import { describe, expect, it } from 'vitest'
import InspectionDiffOperationTest from '@/components/inspection/InspectionDiffOperationTest.vue'
import { starterChecks } from '@shared/inspection/starter-template'
import { buttonNamed } from '../support/queries'
import { createTestVuetify } from '../support/vuetify'

const diffOperation = starterChecks.find((c) => c.code === 'diff-operation')!

function mountTest() {
  return mount(InspectionDiffOperationTest, { props: { check: diffOperation, recorded: null }, global: { plugins: [createTestVuetify()] } })
}

/** Answers the steps in the order shown, checking each question so the order itself is tested. */
async function answer(wrapper: ReturnType<typeof mountTest>, steps: [RegExp, 'Yes' | 'No'][]) {
  for (const [question, reply] of steps) {
    const group = wrapper.get('[role="group"]')
    expect(group.attributes('aria-label')).toMatch(question)
    await buttonNamed(group, reply).trigger('click')
  }
}

// DESIGN §4 (common practice): both wheels the same way when the prop turns; opposite ways with the
// prop held; the prop turns with one wheel held; nothing binds.
const normalUntilStiff: [RegExp, 'Yes' | 'No'][] = [
  [/Turn the prop shaft by hand/, 'Yes'],
  [/neither able to be held still/, 'No'],
  [/Hold the prop shaft still and turn one wheel/, 'Yes'],
  [/Hold one wheel still and turn the other/, 'Yes'],
]

describe('InspectionDiffOperationTest', () => {
  it('walks through the steps one at a time', async () => {
    const wrapper = mountTest()

    expect(wrapper.text()).toContain('Step 1 of 5')
    await buttonNamed(wrapper, 'Yes').trigger('click')
    expect(wrapper.text()).toContain('Step 2 of 5')
    await buttonNamed(wrapper, 'Previous step').trigger('click')
    expect(wrapper.text()).toContain('Step 1 of 5')
  })

  it('ends in “faulty” for a wheel that is stiff to turn, suggesting “Fix now — safety”', async () => {
    const wrapper = mountTest()

    await answer(wrapper, [...normalUntilStiff, [/stiff or hard to turn/, 'Yes']])

    expect(wrapper.get('[role="status"]').text()).toContain('Verdict: faulty.')
    expect(wrapper.get('.v-chip').text()).toBe('Fix now — safety')
    expect(wrapper.emitted('record')).toEqual([
      [
        {
          kind: 'diff-operation',
          steps: {
            propTurnsWheelsSameWay: 'yes',
            propWontStop: 'no',
            heldPropOtherWheelOpposite: 'yes',
            heldWheelPropTurns: 'yes',
            wheelStiff: 'yes',
          },
        },
      ],
    ])
  })

  it('ends in “normal” when every step behaves', async () => {
    const wrapper = mountTest()

    await answer(wrapper, [...normalUntilStiff, [/stiff or hard to turn/, 'No']])

    expect(wrapper.get('[role="status"]').text()).toContain('Verdict: normal.')
    expect(wrapper.get('.v-chip').text()).toBe('All good')
  })

  it('ends in “faulty” when the prop keeps both wheels locked together', async () => {
    const wrapper = mountTest()

    await answer(wrapper, [
      [/Turn the prop shaft by hand/, 'Yes'],
      [/neither able to be held still/, 'Yes'],
      [/Hold the prop shaft still/, 'No'],
      [/Hold one wheel still/, 'No'],
      [/stiff or hard to turn/, 'No'],
    ])

    expect(wrapper.get('[role="status"]').text()).toContain('Verdict: faulty.')
  })
})
