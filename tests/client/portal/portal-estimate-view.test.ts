import { describe, expect, it } from 'vitest'
import { formatLongDay } from '@/composables/date-time'
import { groupBySeverity, requiresWords, savingWithTax, telHref } from '@/composables/portal-estimate-view'
import { snapshot } from './fixtures'

describe('the estimate page wording', () => {
  it('groups items most serious first and keeps the workshop order within a level', () => {
    const items = snapshot().items
    const more = [...items, { ...items[0]!, id: 'item-late', number: 4, title: 'Rear hub seal', severity: 'urgent' as const }]
    expect(groupBySeverity(more).map((g) => [g.severity, g.items.map((i) => i.number)])).toEqual([
      ['urgent', [2, 4]],
      ['soon', [1]],
      ['watch', [3]],
    ])
  })

  it('says what an item needs as advice while deciding and as a fact afterwards', () => {
    const items = snapshot().items
    const boot = items[2]!
    expect(requiresWords(boot, items, true)).toEqual(['Needs item 2 (Front CV joint) — approve that too.'])
    expect(requiresWords(boot, items, false)).toEqual(['Can only be done together with item 2 (Front CV joint).'])
  })

  it('adds VAT to a saving on prices entered without it, and leaves one entered with it alone', () => {
    // 6,400 pence plus 20% is 7,680 (by hand).
    expect(savingWithTax(6400, '20', { currency: 'GBP', taxMode: 'exclusive' })).toBe(7680)
    expect(savingWithTax(6400, '20', { currency: 'GBP', taxMode: 'inclusive' })).toBe(6400)
    expect(savingWithTax(0, '20', { currency: 'GBP', taxMode: 'exclusive' })).toBe(0)
  })

  it('writes a decision date the same way in every time zone, and a phone number a phone can dial', () => {
    expect(formatLongDay('2026-03-31')).toBe('Tuesday 31 March 2026')
    expect(telHref('+44 (0)1632 960-555')).toBe('tel:+441632960555')
  })
})
