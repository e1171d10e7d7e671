import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { listAccessSteps } from '@/api/catalogue'
import { addFindings, createEstimate, getEstimate, listEstimates, saveDraft, sendEstimate } from '@/api/estimates'
import { listFindings } from '@/api/findings'
import { ApiError } from '@/api/http'
import { AUTOSAVE_DELAY_MS, STALE_MESSAGE, useEstimateStore } from '@/stores/estimate'
import { LIVE_REFRESH_DELAY_MS } from '@/stores/estimate-live'
import { useEstimatesStore } from '@/stores/estimates'
import { useNotificationsStore } from '@/stores/notifications'
import type { LabourOperation } from '@shared/schemas/catalogue'
import type { Finding } from '@shared/schemas/inspections'
import type { LiveEvent } from '@shared/schemas/live'
import { draft, draftItem, estimateDetail, estimateIds, estimateSummary } from '../support/estimates'
import { page, testIds, testWorkshop } from '../support/records'

vi.mock('@/api/estimates', () => ({
  listEstimates: vi.fn(),
  getEstimate: vi.fn(),
  createEstimate: vi.fn(),
  saveDraft: vi.fn(),
  addFindings: vi.fn(),
  sendEstimate: vi.fn(),
  withdrawEstimate: vi.fn(),
  resendEmail: vi.fn(),
  refundDeposit: vi.fn(),
  versionPdfUrl: vi.fn(),
}))
vi.mock('@/api/findings', () => ({ listFindings: vi.fn() }))
vi.mock('@/api/catalogue', () => ({ listAccessSteps: vi.fn(), searchParts: vi.fn() }))

const mocks = [listEstimates, getEstimate, createEstimate, saveDraft, addFindings, sendEstimate, listFindings, listAccessSteps]

function liveEvent(overrides: Partial<LiveEvent> = {}): LiveEvent {
  return {
    type: 'estimate.decision',
    workshopId: testWorkshop.id,
    estimateId: estimateIds.estimate,
    at: '2026-03-02T14:03:00.000Z',
    ...overrides,
  }
}

/** The detail the server answers a save with: the draft it was sent, one revision on. */
function savedAnswer() {
  vi.mocked(saveDraft).mockImplementation(async (_id, revision, saved) => estimateDetail({ draft: saved, revision: revision + 1 }))
}

async function loaded() {
  vi.mocked(getEstimate).mockResolvedValueOnce(estimateDetail())
  const store = useEstimateStore()
  await store.load(estimateIds.estimate)
  return store
}

beforeEach(() => {
  vi.useFakeTimers()
  setActivePinia(createPinia())
  for (const fn of mocks) vi.mocked(fn).mockReset()
})

afterEach(() => {
  vi.useRealTimers()
})

describe('useEstimateStore autosave', () => {
  it('saves once, 800 ms after the typing stops, naming the revision it started from', async () => {
    savedAnswer()
    const store = await loaded()
    expect(store.saveState).toBe('saved')

    store.updateItem('item-hub', { title: 'Front hub' })
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS - 100)
    store.updateItem('item-hub', { title: 'Front hub strip and seal' })
    expect(store.saveState).toBe('pending')
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS - 100)
    expect(saveDraft).not.toHaveBeenCalled()

    await vi.advanceTimersByTimeAsync(100)

    expect(saveDraft).toHaveBeenCalledOnce()
    const [id, revision, sent] = vi.mocked(saveDraft).mock.calls[0]!
    expect(id).toBe(estimateIds.estimate)
    expect(revision).toBe(3)
    expect(sent.items[0]?.title).toBe('Front hub strip and seal')
    expect(store.saveState).toBe('saved')
    expect(store.dirty).toBe(false)
    expect(store.baseRevision).toBe(4)
  })

  it('saves at once when asked to flush, e.g. on leaving the page', async () => {
    savedAnswer()
    const store = await loaded()
    store.updateSettings({ message: 'Parts arrive Tuesday.' })

    await expect(store.flush()).resolves.toBe(true)

    expect(saveDraft).toHaveBeenCalledOnce()
    expect(vi.mocked(saveDraft).mock.calls[0]![2].message).toBe('Parts arrive Tuesday.')
  })

  it('keeps typing that arrives while a save is on its way, and saves it next', async () => {
    let finish: (() => void) | undefined
    vi.mocked(saveDraft).mockImplementation(
      (_id, revision, saved) =>
        new Promise((resolve) => {
          finish = () => resolve(estimateDetail({ draft: saved, revision: revision + 1 }))
        }),
    )
    const store = await loaded()
    store.updateItem('item-hub', { title: 'First' })
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS)
    expect(store.saveState).toBe('saving')

    store.updateItem('item-hub', { title: 'Second' })
    finish?.()
    await vi.advanceTimersByTimeAsync(0)
    expect(store.draft?.items[0]?.title).toBe('Second')
    expect(store.dirty).toBe(true)

    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS)
    finish?.()
    await vi.advanceTimersByTimeAsync(0)
    expect(saveDraft).toHaveBeenCalledTimes(2)
    expect(vi.mocked(saveDraft).mock.calls[1]!.slice(1, 2)).toEqual([4])
    expect(vi.mocked(saveDraft).mock.calls[1]![2].items[0]?.title).toBe('Second')
    expect(store.saveState).toBe('saved')
  })

  it('says someone else changed the estimate when the server refuses a stale revision, and stops saving until reloaded', async () => {
    vi.mocked(saveDraft).mockRejectedValue(new ApiError(409, 'stale_revision', 'Someone else changed this estimate since you opened it.'))
    const store = await loaded()

    store.updateItem('item-hub', { title: 'Mine' })
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS)

    expect(store.saveState).toBe('stale')
    expect(useNotificationsStore().queue.map((n) => n.text)).toEqual([STALE_MESSAGE])
    expect(STALE_MESSAGE).toBe('Someone else changed this estimate — reload to see their changes')

    store.updateItem('item-hub', { title: 'Mine again' })
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS * 2)
    expect(saveDraft).toHaveBeenCalledOnce()

    vi.mocked(getEstimate).mockResolvedValueOnce(estimateDetail({ revision: 5, draft: draft({ items: [draftItem({ title: 'Theirs' })] }) }))
    await store.reload()
    expect(store.saveState).toBe('saved')
    expect(store.draft?.items[0]?.title).toBe('Theirs')
    expect(store.baseRevision).toBe(5)
  })

  it('offers a retry after a failed save and does not lose the change', async () => {
    vi.mocked(saveDraft).mockRejectedValueOnce(
      new ApiError(0, 'network_error', 'The server cannot be reached. Check the connection and try again.'),
    )
    const store = await loaded()
    store.updateItem('item-hub', { customerNote: 'Seal weeping onto the brake disc' })
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS)
    expect(store.saveState).toBe('failed')
    expect(useNotificationsStore().queue.map((n) => n.text)).toEqual(['The server cannot be reached. Check the connection and try again.'])

    savedAnswer()
    await store.save()

    expect(vi.mocked(saveDraft).mock.calls[1]![2].items[0]?.customerNote).toBe('Seal weeping onto the brake disc')
    expect(store.saveState).toBe('saved')
  })

  it('does not send a draft the contract refuses, and says why in the save state', async () => {
    savedAnswer()
    const store = await loaded()

    store.updateItem('item-hub', { title: '' })
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS)

    expect(saveDraft).not.toHaveBeenCalled()
    expect(store.saveState).toBe('invalid')
    expect(store.placed.items.get(0)?.item).toContain('Give the item a title')

    store.setFieldProblem('line-hub-seal.unitPrice', 'Write the price as an amount such as 12.50')
    store.updateItem('item-hub', { title: 'Front hub' })
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS)
    expect(saveDraft).not.toHaveBeenCalled()

    store.setFieldProblem('line-hub-seal.unitPrice', null)
    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS)
    expect(saveDraft).toHaveBeenCalledOnce()
  })
})

describe('useEstimateStore live updates', () => {
  it('takes the customer’s decisions and the new status but keeps unsaved local edits', async () => {
    savedAnswer()
    const store = await loaded()
    store.updateItem('item-hub', { title: 'Typed here, not saved yet' })

    vi.mocked(getEstimate).mockResolvedValueOnce(
      estimateDetail({
        status: 'confirmed',
        revision: 3,
        draft: draft({ items: [draftItem({ title: 'What the server had' })] }),
        decisions: [{ itemId: 'item-hub', decision: 'approved', decidedAt: '2026-03-02T14:03:00.000Z' }],
      }),
    )
    store.onLiveEvent(liveEvent({ type: 'estimate.confirmed', summary: 'Maris Fenwick confirmed E-0042' }))
    store.onLiveEvent(liveEvent({ type: 'email.status' }))
    await vi.advanceTimersByTimeAsync(LIVE_REFRESH_DELAY_MS)

    expect(getEstimate).toHaveBeenCalledTimes(2)
    expect(store.detail?.status).toBe('confirmed')
    expect(store.detail?.decisions).toEqual([{ itemId: 'item-hub', decision: 'approved', decidedAt: '2026-03-02T14:03:00.000Z' }])
    expect(store.draft?.items[0]?.title).toBe('Typed here, not saved yet')
    expect(store.dirty).toBe(true)
    expect(useNotificationsStore().queue.map((n) => n.text)).toContain('Maris Fenwick confirmed E-0042')

    await vi.advanceTimersByTimeAsync(AUTOSAVE_DELAY_MS)
    expect(vi.mocked(saveDraft).mock.calls[0]!.slice(1, 2)).toEqual([3])
    expect(vi.mocked(saveDraft).mock.calls[0]![2].items[0]?.title).toBe('Typed here, not saved yet')
  })

  it('shows another person’s saved changes when nothing is being edited here', async () => {
    const store = await loaded()
    vi.mocked(getEstimate).mockResolvedValueOnce(estimateDetail({ revision: 4, draft: draft({ message: 'From the other desk' }) }))

    store.onLiveEvent(liveEvent({ type: 'estimate.changed' }))
    await vi.advanceTimersByTimeAsync(LIVE_REFRESH_DELAY_MS)

    expect(store.draft?.message).toBe('From the other desk')
    expect(store.baseRevision).toBe(4)
    expect(store.saveState).toBe('saved')
  })

  it('warns at once when someone else saved while there are edits here', async () => {
    const store = await loaded()
    store.updateItem('item-hub', { title: 'Mine' })
    vi.mocked(getEstimate).mockResolvedValueOnce(estimateDetail({ revision: 4 }))

    store.onLiveEvent(liveEvent({ type: 'estimate.changed' }))
    await vi.advanceTimersByTimeAsync(LIVE_REFRESH_DELAY_MS)

    expect(store.saveState).toBe('stale')
    expect(store.draft?.items[0]?.title).toBe('Mine')
    expect(saveDraft).not.toHaveBeenCalled()
  })

  it('ignores events about other estimates', async () => {
    const store = await loaded()
    store.onLiveEvent(liveEvent({ estimateId: estimateIds.other }))
    await vi.advanceTimersByTimeAsync(LIVE_REFRESH_DELAY_MS)
    expect(getEstimate).toHaveBeenCalledOnce()
  })
})

describe('useEstimateStore editing and actions', () => {
  it('adds labour with its access steps and every step they include', async () => {
    vi.mocked(listAccessSteps).mockResolvedValue({
      items: [
        {
          id: '11111111-1111-4111-8111-111111111111',
          code: 'WHEEL',
          name: 'Wheel off',
          hours: '0.3',
          includes: [],
          totalHours: '0.3',
          usedBy: 3,
        },
        {
          id: '22222222-2222-4222-8222-222222222222',
          code: 'HUB',
          name: 'Hub off',
          hours: '0.9',
          includes: ['WHEEL'],
          totalHours: '1.2',
          usedBy: 2,
        },
      ],
    })
    const store = await loaded()
    await store.loadAccessStepGraph()
    const op: LabourOperation = {
      id: '33333333-3333-4333-8333-333333333333',
      code: 'CV-L',
      name: 'Replace front CV joint',
      synonyms: [],
      system: 'front_axle',
      vehicleGroups: [],
      side: 'left',
      bookHours: '3.5',
      category: 'specialist',
      notes: null,
      accessSteps: [{ code: 'HUB', name: 'Hub off', hours: '0.9', includes: ['WHEEL'] }],
      accessHours: '1.2',
      rateMinor: 9500,
      priceMinor: 33250,
      currency: 'GBP',
      archived: false,
    }

    store.addLabour('item-hub', op, '20')

    const line = store.draft?.items[0]?.lines[2]
    expect(line).toMatchObject({
      kind: 'labour',
      description: 'Replace front CV joint',
      hours: '3.5',
      rate: 9500,
      category: 'specialist',
      operationCode: 'CV-L',
      accessSteps: ['HUB'],
    })
    expect(store.draft?.accessSteps).toEqual([
      { code: 'HUB', hours: '0.9', includes: ['WHEEL'], label: 'Hub off' },
      { code: 'WHEEL', hours: '0.3', includes: [], label: 'Wheel off' },
    ])
    expect(store.issues).toEqual([])
  })

  it('removes an item, drops it from what others require, and puts both back on undo', async () => {
    const store = await loaded()
    store.addItem(draftItem({ id: 'item-seal', title: 'Swivel seal', requires: ['item-hub'], lines: [] }))

    const removed = store.removeItem('item-hub')
    expect(store.draft?.items.map((i) => i.id)).toEqual(['item-seal'])
    expect(store.draft?.items[0]?.requires).toEqual([])

    store.restoreItem(removed!)
    expect(store.draft?.items.map((i) => i.id)).toEqual(['item-hub', 'item-seal'])
    expect(store.draft?.items[1]?.requires).toEqual(['item-hub'])
  })

  it('saves waiting changes before sending, then sends that revision', async () => {
    savedAnswer()
    vi.mocked(sendEstimate).mockImplementation(async (_id, revision) =>
      estimateDetail({
        status: 'sent',
        revision,
        hasUnsentChanges: false,
        versions: [
          {
            id: estimateIds.version,
            version: 1,
            hash: 'ab',
            sentAt: '2026-03-02T14:03:00.000Z',
            expiresOn: '2026-03-16',
            supersededAt: null,
            openedAt: null,
            confirmedAt: null,
            proposedGross: 17400,
          },
        ],
      }),
    )
    const store = await loaded()
    store.updateSettings({ message: 'Ready when you are.' })

    await expect(store.send()).resolves.toBe(true)

    expect(saveDraft).toHaveBeenCalledOnce()
    expect(sendEstimate).toHaveBeenCalledWith(estimateIds.estimate, 4)
    expect(store.detail?.status).toBe('sent')
    expect(useNotificationsStore().queue.map((n) => n.text)).toEqual(['Sent to maris@fenwick.test.'])
  })

  it('adds findings as items and shows what the server could not price', async () => {
    vi.mocked(addFindings).mockResolvedValue(
      estimateDetail({ revision: 4, notices: ['"Hub seal": the suggested part HS-9 is not in your parts list; add the part by hand.'] }),
    )
    const store = await loaded()

    await store.addFindings([estimateIds.findingHub])

    expect(addFindings).toHaveBeenCalledWith(estimateIds.estimate, 3, [estimateIds.findingHub])
    expect(store.notices).toEqual(['"Hub seal": the suggested part HS-9 is not in your parts list; add the part by hand.'])
  })
})

describe('useEstimatesStore', () => {
  it('lists the most recently changed first and filters by status', async () => {
    vi.mocked(listEstimates).mockResolvedValue(page([estimateSummary()], 1))
    const estimates = useEstimatesStore()

    await estimates.load()
    expect(listEstimates).toHaveBeenLastCalledWith({ page: 1, pageSize: 25, sortBy: 'updatedAt', sortDesc: true, q: undefined })

    await estimates.setFilters({ status: 'confirmed' })
    expect(listEstimates).toHaveBeenLastCalledWith(expect.objectContaining({ status: 'confirmed', page: 1 }))
  })

  it('starts an estimate from every finding on the job that is not “All good”', async () => {
    const finding = (id: string, severity: Finding['severity']) => ({ id, severity }) as Finding
    vi.mocked(listFindings).mockResolvedValue([
      finding(estimateIds.findingHub, 'urgent'),
      finding(testIds.vehicle, 'ok'),
      finding(estimateIds.findingSeal, 'watch'),
    ])
    vi.mocked(createEstimate).mockResolvedValue(estimateDetail())
    const estimates = useEstimatesStore()

    const started = await estimates.startForJob(testIds.job)

    expect(createEstimate).toHaveBeenCalledWith(testIds.job, [estimateIds.findingHub, estimateIds.findingSeal])
    expect(started?.id).toBe(estimateIds.estimate)
    expect(estimates.byJob[testIds.job]).toEqual({ id: estimateIds.estimate, reference: 'E-0042', status: 'draft' })
    expect(useEstimateStore().detail?.id).toBe(estimateIds.estimate)
  })

  it('finds the estimate already on a job', async () => {
    vi.mocked(listEstimates)
      .mockResolvedValueOnce(page([estimateSummary()], 1))
      .mockResolvedValueOnce(page([], 0))
    const estimates = useEstimatesStore()

    await estimates.findForJob(testIds.job)
    await estimates.findForJob(testIds.vehicle)

    expect(listEstimates).toHaveBeenCalledWith(expect.objectContaining({ jobId: testIds.job }))
    expect(estimates.byJob[testIds.job]?.reference).toBe('E-0042')
    expect(estimates.byJob[testIds.vehicle]).toBeNull()
  })

  it('reloads the page of rows once for a burst of live events', async () => {
    vi.mocked(listEstimates).mockResolvedValue(page([estimateSummary()], 1))
    const estimates = useEstimatesStore()
    await estimates.load()

    estimates.refreshSoon()
    estimates.refreshSoon()
    estimates.refreshSoon()
    await vi.advanceTimersByTimeAsync(LIVE_REFRESH_DELAY_MS)

    expect(listEstimates).toHaveBeenCalledTimes(2)
  })
})
