import { createPinia, setActivePinia } from 'pinia'
import { beforeEach, describe, expect, it, vi } from 'vitest'
import { getMyEstimate, putDecision } from '@/api/portal'
import { usePortalEstimateStore } from '@/stores/portal-estimate'
import type { Decision } from '@shared/estimate/contract'
import type { DecisionResponse } from '@shared/schemas/portal'
import { deferred } from '../support/records'
import { pendingDecisions, portalEstimate, portalIds, priced, snapshot } from './fixtures'

vi.mock('@/api/portal', () => ({ getMyEstimate: vi.fn(), putDecision: vi.fn() }))

beforeEach(() => {
  setActivePinia(createPinia())
  vi.mocked(getMyEstimate).mockReset().mockResolvedValue(portalEstimate())
  vi.mocked(putDecision).mockReset()
})

describe('deciding', () => {
  it('sends choices one after another, so an item reaches the server after the item it needs', async () => {
    const first = deferred<DecisionResponse>()
    const second = deferred<DecisionResponse>()
    vi.mocked(putDecision).mockReturnValueOnce(first.promise).mockReturnValueOnce(second.promise)
    const store = usePortalEstimateStore()
    await store.load(portalIds.estimate)

    const cv = store.decide('item-cv', 'approved')
    const boot = store.decide('item-boot', 'approved')
    await Promise.resolve()

    expect(putDecision).toHaveBeenCalledTimes(1)
    const both = { ...pendingDecisions, 'item-cv': 'approved', 'item-boot': 'approved' } as const
    expect(store.result?.approved.gross).toBe(priced(snapshot(), both).approved.gross)

    const afterFirst = { ...pendingDecisions, 'item-cv': 'approved' } as const
    first.resolve({ version: 1, decisions: afterFirst, result: priced(snapshot(), afterFirst) })
    await cv
    expect(vi.mocked(putDecision).mock.calls.map((c) => c[1])).toEqual(['item-cv', 'item-boot'])
    // Still saving the second: the figures include it.
    expect(store.decisions['item-boot']).toBe('approved')
    expect(store.result?.approved.gross).toBe(priced(snapshot(), both).approved.gross)

    second.resolve({ version: 1, decisions: both, result: priced(snapshot(), both) })
    await boot
    expect(store.isSaving).toBe(false)
  })

  it('sends only the last of several quick taps on the same item', async () => {
    const first = deferred<DecisionResponse>()
    vi.mocked(putDecision)
      .mockReturnValueOnce(first.promise)
      .mockImplementation(async (_id, itemId, body) => {
        const decisions: Record<string, Decision> = { ...pendingDecisions, 'item-hub': 'approved', [itemId]: body.decision }
        return { version: 1, decisions, result: priced(snapshot(), decisions) }
      })
    const store = usePortalEstimateStore()
    await store.load(portalIds.estimate)

    const a = store.decide('item-hub', 'approved')
    const b = store.decide('item-cv', 'approved')
    const c = store.decide('item-cv', 'declined')
    const approvedHub = { ...pendingDecisions, 'item-hub': 'approved' } as const
    first.resolve({ version: 1, decisions: approvedHub, result: priced(snapshot(), approvedHub) })
    await Promise.all([a, b, c])

    expect(vi.mocked(putDecision).mock.calls.map((call) => [call[1], call[2].decision])).toEqual([
      ['item-hub', 'approved'],
      ['item-cv', 'declined'],
    ])
    expect(store.decisions['item-cv']).toBe('declined')
  })
})
