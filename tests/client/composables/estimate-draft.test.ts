import { describe, expect, it } from 'vitest'
import { manualItem, mergeAccessSteps, moved, newDraftId, placeIssues, requiresWording } from '@/composables/estimate-draft'
import { latestVersion, versionHeadline, formatMoment, emailKindWording } from '@/composables/estimate-wording'
import { DraftIdSchema, DraftItemSchema } from '@shared/schemas/estimates'

describe('estimate draft helpers', () => {
  it('makes ids and items the contract accepts', () => {
    const ids = new Set(Array.from({ length: 200 }, () => newDraftId('line')))
    expect(ids.size).toBe(200)
    for (const id of ids) expect(DraftIdSchema.safeParse(id).success).toBe(true)
    expect(DraftItemSchema.safeParse(manualItem()).success).toBe(true)
  })

  it('adds an operation’s access steps once, with what they include when the step graph knows it', () => {
    const graph = [
      { id: '1', code: 'WHEEL', name: 'Wheel off', hours: '0.3', includes: [], totalHours: '0.3', usedBy: 1 },
      { id: '2', code: 'CALIPER', name: 'Caliper off', hours: '0.2', includes: ['WHEEL'], totalHours: '0.5', usedBy: 1 },
    ]
    const current = [{ code: 'WHEEL', hours: '0.4', includes: [], label: 'Wheel off (kept)' }]

    const merged = mergeAccessSteps(current, [{ code: 'HUB', name: 'Hub off', hours: '0.9', includes: ['CALIPER', 'WHEEL'] }], graph)

    expect(merged).toEqual([
      { code: 'WHEEL', hours: '0.4', includes: [], label: 'Wheel off (kept)' },
      { code: 'HUB', hours: '0.9', includes: ['CALIPER', 'WHEEL'], label: 'Hub off' },
      { code: 'CALIPER', hours: '0.2', includes: ['WHEEL'], label: 'Caliper off' },
    ])
    expect(mergeAccessSteps(merged, [{ code: 'HUB', name: 'Hub off', hours: '0.9', includes: ['CALIPER', 'WHEEL'] }], graph)).toEqual(
      merged,
    )
  })

  it('moves an entry within the list and leaves it be at either end', () => {
    expect(moved(['a', 'b', 'c'], 1, -1)).toEqual(['b', 'a', 'c'])
    expect(moved(['a', 'b', 'c'], 1, 1)).toEqual(['a', 'c', 'b'])
    expect(moved(['a', 'b', 'c'], 0, -1)).toEqual(['a', 'b', 'c'])
    expect(moved(['a', 'b', 'c'], 2, 1)).toEqual(['a', 'b', 'c'])
  })

  it('puts each issue beside the item or line its path names', () => {
    const placed = placeIssues([
      { path: ['items', 0, 'lines', 1, 'hours'], message: 'Hours must be a decimal string' },
      { path: ['items', 0, 'lines', 1, 'hours'], message: 'Hours must be a decimal string' },
      { path: ['items', 2, 'requires', 0], message: 'Item 3 cannot require itself' },
      { path: ['accessSteps', 0, 'includes', 0], message: 'Access step "HUB" includes unknown step "X"' },
    ])

    expect(placed.items.get(0)?.lines.get(1)).toEqual(['Hours must be a decimal string'])
    expect(placed.items.get(2)?.item).toEqual(['Item 3 cannot require itself'])
    expect(placed.general).toEqual(['Access step "HUB" includes unknown step "X"'])
  })

  it('says what an item needs approved first', () => {
    const items = [
      { id: 'a', number: 1, title: 'Hub strip' },
      { id: 'b', number: 2, title: 'CV joint' },
      { id: 'c', number: 3, title: 'Seal' },
    ]
    expect(requiresWording([], items)).toBeNull()
    expect(requiresWording(['a'], items)).toBe('Needs item 1 (Hub strip) to be approved')
    expect(requiresWording(['a', 'b', 'c'], items)).toBe('Needs item 1 (Hub strip), item 2 (CV joint) and item 3 (Seal) to be approved')
  })
})

describe('estimate wording', () => {
  const version = (n: number, sentAt: string) => ({
    id: `v${n}`,
    version: n,
    hash: '',
    sentAt,
    expiresOn: '2026-03-16',
    supersededAt: null,
    openedAt: null,
    confirmedAt: null,
    proposedGross: 0,
  })

  it('reads moments by the workshop’s clock, summer time included', () => {
    // UK summer time (BST, UTC+1) runs from late March to late October (common knowledge).
    expect(formatMoment('2026-03-02T14:03:00.000Z', 'Europe/London')).toBe('2 Mar 14:03')
    expect(formatMoment('2026-07-02T13:03:00.000Z', 'Europe/London')).toBe('2 Jul 14:03')
  })

  it('heads the page with the version the customer has, or the one being drafted', () => {
    expect(versionHeadline({ versions: [], hasUnsentChanges: true }, 'Europe/London')).toBe('Version 1 — draft, not sent')
    const sent = [version(1, '2026-02-20T09:00:00.000Z'), version(2, '2026-03-02T14:03:00.000Z')]
    expect(latestVersion({ versions: sent })?.version).toBe(2)
    expect(versionHeadline({ versions: sent, hasUnsentChanges: false }, 'Europe/London')).toBe('Version 2 sent 2 Mar 14:03')
    expect(versionHeadline({ versions: sent, hasUnsentChanges: true }, 'Europe/London')).toBe('Version 3 — draft, not sent')
    expect(versionHeadline({ versions: sent, hasUnsentChanges: false }, 'Europe/London', true)).toBe('Version 3 — draft, not sent')
  })

  it('turns the outbox’s kinds into words', () => {
    expect(emailKindWording('estimate_sent')).toBe('Estimate sent')
    expect(emailKindWording('deposit.receipt')).toBe('Deposit receipt')
  })
})
