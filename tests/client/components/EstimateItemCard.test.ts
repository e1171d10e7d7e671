// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { afterEach, describe, expect, it } from 'vitest'
import EstimateItemCard from '@/components/estimates/EstimateItemCard.vue'
import { calculateEstimate } from '@shared/estimate'
import type { DraftItem } from '@shared/schemas/estimates'
import { draftToEngineInput } from '@shared/schemas/estimates'
import { buttonByName, fieldByLabel, fieldMessages, typeInto } from '../support/dom'
import { draft, draftItem } from '../support/estimates'
import { createTestVuetify } from '../support/vuetify'

let unmount: (() => void) | undefined

const items = [
  { id: 'item-hub', number: 1, title: 'Hub strip' },
  { id: 'item-cv', number: 2, title: 'CV joint' },
  { id: 'item-seal', number: 3, title: 'Swivel seal' },
]

function mountCard(props: { item?: DraftItem; number?: number; canEdit?: boolean; [key: string]: unknown } = {}) {
  const wrapper = mount(EstimateItemCard, {
    props: {
      item: draftItem({ id: 'item-cv', title: 'CV joint' }),
      number: 2,
      items,
      currency: 'GBP',
      timeZone: 'Europe/London',
      canEdit: true,
      ...props,
    },
    global: { plugins: [createTestVuetify()] },
    attachTo: document.body,
  })
  unmount = () => wrapper.unmount()
  return wrapper
}

afterEach(() => {
  unmount?.()
  unmount = undefined
})

describe('EstimateItemCard', () => {
  it('sends the new hours of a labour line up once they read as a number', async () => {
    const wrapper = mountCard()

    typeInto(fieldByLabel('Hours'), '2.5')
    await flushPromises()

    const [[line]] = wrapper.emitted('update-line') as [[DraftItem['lines'][number]]]
    expect(line).toMatchObject({ id: 'line-hub-labour', kind: 'labour', hours: '2.5', rate: 8000 })
  })

  it('keeps half-typed hours on screen with a message, and tells the page it cannot be saved yet', async () => {
    const wrapper = mountCard()
    const hours = fieldByLabel('Hours')

    typeInto(hours, '2.5h')
    await flushPromises()

    expect(wrapper.emitted('update-line')).toBeUndefined()
    expect(fieldMessages(hours)).toBe('Write the hours as a number such as 1.5')
    expect(wrapper.emitted('problem')).toEqual([['line-hub-labour.hours', 'Write the hours as a number such as 1.5']])

    typeInto(hours, '2.5')
    await flushPromises()
    expect(wrapper.emitted('problem')?.at(-1)).toEqual(['line-hub-labour.hours', null])
  })

  it('takes prices in pounds and pence and hands them on in pence', async () => {
    const wrapper = mountCard()

    typeInto(fieldByLabel('Unit price'), '14.99')
    await flushPromises()

    const [[line]] = wrapper.emitted('update-line') as [[DraftItem['lines'][number]]]
    expect(line).toMatchObject({ id: 'line-hub-seal', kind: 'part', unitPrice: 1499 })
  })

  it('moves up and down by named buttons, with none past either end', async () => {
    const wrapper = mountCard()

    buttonByName('Move item 2 up').click()
    buttonByName('Move item 2 down').click()
    await flushPromises()
    expect(wrapper.emitted('move')).toEqual([[-1], [1]])

    await wrapper.setProps({ number: 1 })
    expect(buttonByName('Move item 1 up').hasAttribute('disabled')).toBe(true)
    await wrapper.setProps({ number: 3 })
    expect(buttonByName('Move item 3 down').hasAttribute('disabled')).toBe(true)
  })

  it('says in words which items must be approved first', () => {
    const wrapper = mountCard({ item: draftItem({ id: 'item-cv', title: 'CV joint', requires: ['item-hub'] }) })
    expect(wrapper.text()).toContain('Needs item 1 (Hub strip) to be approved.')

    unmount?.()
    const both = mountCard({ item: draftItem({ id: 'item-cv', title: 'CV joint', requires: ['item-hub', 'item-seal'] }) })
    expect(both.text()).toContain('Needs item 1 (Hub strip) and item 3 (Swivel seal) to be approved.')
  })

  it('shows the engine’s shared-access note under the line it concerns', () => {
    const d = draft({
      accessSteps: [{ code: 'HUB', hours: '1.2', includes: [], label: 'Hub off' }],
      items: [
        draftItem({
          id: 'item-hub',
          lines: [
            {
              id: 'a',
              kind: 'labour',
              description: 'Hub seal',
              hours: '1.8',
              rate: 8000,
              taxRate: '20',
              accessSteps: ['HUB'],
              operationCode: null,
              category: 'standard',
            },
          ],
        }),
        draftItem({
          id: 'item-cv',
          title: 'CV joint',
          lines: [
            {
              id: 'b',
              kind: 'labour',
              description: 'CV joint',
              hours: '3.5',
              rate: 8000,
              taxRate: '20',
              accessSteps: ['HUB'],
              operationCode: null,
              category: 'standard',
            },
          ],
        }),
      ],
    })
    // As the builder prices it: every item approved, so later items share what earlier ones open up.
    const result = calculateEstimate(draftToEngineInput(d, 'GBP', { 'item-hub': 'approved', 'item-cv': 'approved' }))
    const note = result.items[1]?.lines[0]?.note

    const wrapper = mountCard({ item: d.items[1], result: result.items[1] })

    expect(note).toContain('item 1')
    // 1.2 h of hub access at £80.00 an hour is charged once: the second line saves 1.2 × £80.00 = £96.00.
    expect(wrapper.get('.estimate-item-line__note').text()).toBe(`${note} — saves 1.2 h (£96.00)`)
  })

  it('shows the customer’s decision in words', () => {
    const wrapper = mountCard({ decision: { itemId: 'item-cv', decision: 'approved', decidedAt: '2026-03-02T14:03:00.000Z' } })
    expect(wrapper.text()).toContain('Approved by customer 2 Mar 14:03')
  })

  it('offers no editing to someone who may only read', () => {
    const wrapper = mountCard({ canEdit: false })
    expect(wrapper.findAll('button').map((b) => b.attributes('aria-label') ?? b.text())).not.toContain('Remove item 2')
    expect(wrapper.text()).not.toContain('Add labour')
    expect(fieldByLabel('Hours').readOnly).toBe(true)
  })
})
