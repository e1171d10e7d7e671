// @vitest-environment happy-dom
import { mount } from '@vue/test-utils'
import { afterEach, describe, expect, it } from 'vitest'
import EstimateTotals from '@/components/estimates/EstimateTotals.vue'
import { calculateEstimate } from '@shared/estimate'
import { formatMoney } from '@shared/money'
import { type EstimateDraft, draftToEngineInput } from '@shared/schemas/estimates'
import { draft, draftItem } from '../support/estimates'
import { createTestVuetify } from '../support/vuetify'

let unmount: (() => void) | undefined

function mountTotals(d: EstimateDraft, currency = 'GBP') {
  const wrapper = mount(EstimateTotals, {
    props: { draft: d, currency },
    global: { plugins: [createTestVuetify()] },
    attachTo: document.body,
  })
  unmount = () => wrapper.unmount()
  return wrapper
}

/** The figure in the totals row whose header (role rowheader) reads `name`. */
function figure(wrapper: ReturnType<typeof mountTotals>, name: string): string {
  const row = wrapper.findAll('tr').find((r) => r.find('th[scope="row"]').exists() && r.get('th').text() === name)
  if (!row) throw new Error(`No totals row named ${name}`)
  return row.get('td').text()
}

afterEach(() => {
  unmount?.()
  unmount = undefined
})

describe('EstimateTotals', () => {
  it('works a small estimate out by hand: 1.5 h at £80.00 and 2 × £12.50 at 20% VAT on top', () => {
    // Labour 1.5 h × £80.00 = £120.00; parts 2 × £12.50 = £25.00; net £120.00 + £25.00 = £145.00.
    // VAT per line at 20%: £24.00 + £5.00 = £29.00 (the same as 20% of £145.00); total £145.00 + £29.00 = £174.00.
    const wrapper = mountTotals(draft())

    expect(figure(wrapper, 'Labour')).toBe('£120.00')
    expect(figure(wrapper, 'Parts')).toBe('£25.00')
    expect(figure(wrapper, 'Net')).toBe('£145.00')
    expect(figure(wrapper, 'VAT at 20%')).toBe('£29.00')
    expect(figure(wrapper, 'Total')).toBe('£174.00')
    expect(wrapper.text()).toContain('Prices exclude VAT')
  })

  it('shows the engine’s own figures for shared access, a discount, two tax rates and a deposit', () => {
    const d = draft({
      accessSteps: [
        { code: 'WHEEL', hours: '0.3', includes: [], label: 'Wheel off' },
        { code: 'HUB', hours: '0.9', includes: ['WHEEL'], label: 'Hub off' },
      ],
      items: [
        draftItem({
          id: 'item-seal',
          lines: [
            {
              id: 'l1',
              kind: 'labour',
              description: 'Hub seal',
              hours: '1.8',
              rate: 8250,
              taxRate: '20',
              accessSteps: ['HUB'],
              operationCode: 'SEAL',
              category: 'standard',
            },
            { id: 'l2', kind: 'part', description: 'Seal kit', quantity: '1', unitPrice: 1999, taxRate: '20', partNumber: 'SK-1' },
          ],
        }),
        draftItem({
          id: 'item-cv',
          title: 'CV joint',
          lines: [
            {
              id: 'l3',
              kind: 'labour',
              description: 'CV joint',
              hours: '3.5',
              rate: 9500,
              taxRate: '20',
              accessSteps: ['HUB'],
              operationCode: 'CV',
              category: 'specialist',
            },
            { id: 'l4', kind: 'fee', description: 'Disposal', amount: 450, taxRate: '0' },
          ],
        }),
      ],
      discount: { kind: 'percent', value: '7.5' },
      deposit: { kind: 'percent', value: '25' },
    })
    const expected = calculateEstimate(draftToEngineInput(d, 'GBP')).proposed
    const money = (minor: number) => formatMoney(minor, 'GBP')

    const wrapper = mountTotals(d)

    expect(expected.sharedSaving).toBeGreaterThan(0)
    expect(figure(wrapper, 'Labour')).toBe(money(expected.labour))
    expect(figure(wrapper, 'Shared access saving (already taken off the labour)')).toBe(money(expected.sharedSaving))
    expect(figure(wrapper, 'Parts')).toBe(money(expected.parts))
    expect(figure(wrapper, 'Fees')).toBe(money(expected.fees))
    expect(figure(wrapper, 'Discount')).toBe(`−${money(expected.discount)}`)
    expect(figure(wrapper, 'Net')).toBe(money(expected.net))
    for (const band of expected.taxByRate) expect(figure(wrapper, `VAT at ${band.rate}%`)).toBe(money(band.tax))
    expect(expected.taxByRate.map((b) => b.rate)).toEqual(expect.arrayContaining(['20', '0']))
    expect(figure(wrapper, 'Total')).toBe(money(expected.gross))
    expect(figure(wrapper, 'Deposit (25% of the approved total)')).toBe(money(expected.deposit))
  })

  it('says why there are no totals while the draft breaks the engine’s rules', () => {
    const wrapper = mountTotals(
      draft({
        items: [
          draftItem({
            lines: [
              {
                id: 'l1',
                kind: 'labour',
                description: 'Hub',
                hours: '0.5',
                rate: 8000,
                taxRate: '20',
                accessSteps: ['NOPE'],
                operationCode: null,
                category: null,
              },
            ],
          }),
        ],
      }),
    )

    expect(wrapper.find('table').exists()).toBe(false)
    expect(wrapper.get('[role="status"]').text()).toBe(
      'The totals cannot be worked out until the problems marked on the estimate are fixed.',
    )
  })
})
