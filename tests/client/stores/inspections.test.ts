// @vitest-environment happy-dom
import { flushPromises } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { ApiError } from '@/api/http'
import * as api from '@/api/inspections'
import { RETRY_BASE_MS, useInspectionsStore } from '@/stores/inspections'
import { useNotificationsStore } from '@/stores/notifications'
import { suggestSeverity } from '@shared/inspection/rules'
import { starterTemplate } from '@shared/inspection/starter-template'
import type { Inspection, RecordResult, SafetyCheck } from '@shared/schemas/inspections'

vi.mock('@/api/inspections', () => ({
  listJobInspections: vi.fn(),
  startInspection: vi.fn(),
  getInspection: vi.fn(),
  saveSafety: vi.fn(),
  recordResult: vi.fn(),
  saveNotes: vi.fn(),
  finishInspection: vi.fn(),
}))

const JOB = '11111111-1111-4111-8111-111111111111'
const INSPECTION = '22222222-2222-4222-8222-222222222222'

const safety: SafetyCheck = {
  standsOnFirmLevelGround: true,
  atLiftingPoints: true,
  wheelsChocked: true,
  notOnJackAlone: true,
  standCapacityKg: 3000,
  capacityBasis: 'per-pair',
  standCount: 2,
  axleLoadKg: 1800,
}

function inspection(status: Inspection['status'], results: RecordResult[] = []): Inspection {
  return {
    id: INSPECTION,
    jobId: JOB,
    templateName: starterTemplate.name,
    definition: starterTemplate.definition,
    status,
    safety: status === 'safety' ? null : safety,
    technicianId: null,
    technicianName: 'Kit Hollins',
    notes: '',
    results: results.map((r, i) => {
      const check = starterTemplate.definition.checks.find((c) => c.code === r.checkCode)!
      const suggestion = suggestSeverity(check, r.value)
      return {
        ...r,
        id: `33333333-3333-4333-8333-33333333333${i}`,
        suggestedSeverity: suggestion.severity,
        detail: suggestion.detail,
        recordedAt: '2025-05-01T09:00:00Z',
        recordedBy: null,
      }
    }),
    startedAt: '2025-05-01T08:00:00Z',
    finishedAt: null,
  }
}

/** The server as the store sees it: every saved reading is kept and every answer is the whole inspection. */
let saved: RecordResult[] = []
const onServer = () => inspection('in_progress', [...saved])

function serverKeepsReadings() {
  return (_id: string, result: RecordResult) => {
    const i = saved.findIndex((r) => r.checkCode === result.checkCode && r.position === result.position)
    if (i >= 0) saved[i] = result
    else saved.push(result)
    return Promise.resolve(onServer())
  }
}

const offline = () => new ApiError(0, 'network_error', 'The server cannot be reached. Check the connection and try again.')
const leak = { checkCode: 'swivel-leak', position: 'left', value: { kind: 'choice', value: 'leak' } } as const
const ball = { checkCode: 'swivel-ball', position: 'left', value: { kind: 'choice', value: 'good' } } as const

async function atTheChecks() {
  vi.mocked(api.listJobInspections).mockImplementation(() => Promise.resolve([onServer()]))
  vi.mocked(api.saveSafety).mockImplementation(() => Promise.resolve(onServer()))
  const store = useInspectionsStore()
  await store.open(JOB)
  expect(store.stage).toBe('safety')
  await store.saveSafety(safety)
  expect(store.stage).toBe('checks')
  return store
}

beforeEach(() => {
  saved = []
  localStorage.clear()
  setActivePinia(createPinia())
  vi.mocked(api.recordResult).mockReset()
  vi.useFakeTimers({ toFake: ['setTimeout', 'clearTimeout'] })
})

afterEach(() => {
  vi.useRealTimers()
})

describe('useInspectionsStore', () => {
  it('asks for the safety step on every visit, even for an inspection already under way', async () => {
    vi.mocked(api.listJobInspections).mockResolvedValue([inspection('in_progress')])
    const store = useInspectionsStore()

    await store.open(JOB)

    expect(store.stage).toBe('safety')
    expect(api.startInspection).not.toHaveBeenCalled()
  })

  it('shows a reading and its suggested severity at once, then marks it saved', async () => {
    const store = await atTheChecks()
    vi.mocked(api.recordResult).mockImplementation(serverKeepsReadings())

    store.record(leak.checkCode, leak.position, leak.value)

    expect(store.readings.get('swivel-leak@left')).toMatchObject({ severity: 'soon', detail: 'Wet leak', state: 'saving' })
    expect(store.progress.done).toBe(1)
    await flushPromises()
    expect(store.readings.get('swivel-leak@left')).toMatchObject({ severity: 'soon', state: 'saved' })
    expect(store.queue).toEqual([])
  })

  it('retries a save that failed on the connection, and sends later readings only after it, in the order tapped', async () => {
    const store = await atTheChecks()
    const server = serverKeepsReadings()
    vi.mocked(api.recordResult).mockRejectedValueOnce(offline()).mockRejectedValueOnce(offline()).mockImplementation(server)

    store.record(leak.checkCode, leak.position, leak.value)
    store.record(ball.checkCode, ball.position, ball.value)
    await flushPromises()

    expect(store.readings.get('swivel-leak@left')?.state).toBe('retrying')
    expect(store.readings.get('swivel-ball@left')?.state).toBe('saving')
    expect(store.isRetrying).toBe(true)
    expect(api.recordResult).toHaveBeenCalledTimes(1)

    await vi.advanceTimersByTimeAsync(RETRY_BASE_MS)
    await flushPromises()
    expect(api.recordResult).toHaveBeenCalledTimes(2)
    expect(store.readings.get('swivel-leak@left')?.state).toBe('retrying')

    await vi.advanceTimersByTimeAsync(RETRY_BASE_MS * 2)
    await flushPromises()

    const sent = vi.mocked(api.recordResult).mock.calls.map(([, r]) => r.checkCode)
    expect(sent).toEqual(['swivel-leak', 'swivel-leak', 'swivel-leak', 'swivel-ball'])
    expect(store.readings.get('swivel-leak@left')?.state).toBe('saved')
    expect(store.readings.get('swivel-ball@left')?.state).toBe('saved')
    expect(store.unsavedCount).toBe(0)
  })

  it('sends the newest tap when a check is tapped again before the first was sent', async () => {
    const store = await atTheChecks()
    vi.mocked(api.recordResult).mockRejectedValueOnce(offline()).mockImplementation(serverKeepsReadings())

    store.record(leak.checkCode, leak.position, leak.value)
    await flushPromises()
    store.record(leak.checkCode, leak.position, { kind: 'choice', value: 'weep' })
    await flushPromises()

    const sent = vi.mocked(api.recordResult).mock.calls.map(([, r]) => r.value)
    expect(sent).toEqual([leak.value, { kind: 'choice', value: 'weep' }])
    expect(store.readings.get('swivel-leak@left')).toMatchObject({ severity: 'watch', state: 'saved' })
  })

  it('on 409 safety_first sends the technician to the safety step and keeps the reading to send after it', async () => {
    const store = await atTheChecks()
    vi.mocked(api.recordResult)
      .mockRejectedValueOnce(new ApiError(409, 'safety_first', 'Record the safety check before the first reading.'))
      .mockImplementation(serverKeepsReadings())

    store.record(leak.checkCode, leak.position, leak.value)
    await flushPromises()

    expect(store.stage).toBe('safety')
    expect(store.readings.get('swivel-leak@left')?.state).toBe('saving')
    expect(useNotificationsStore().queue).toMatchObject([{ kind: 'info', text: expect.stringMatching(/safety check first/) }])
    await vi.advanceTimersByTimeAsync(RETRY_BASE_MS * 10)
    expect(api.recordResult).toHaveBeenCalledTimes(1)

    await store.saveSafety(safety)
    await flushPromises()

    expect(store.stage).toBe('checks')
    expect(api.recordResult).toHaveBeenCalledTimes(2)
    expect(store.readings.get('swivel-leak@left')?.state).toBe('saved')
  })

  it('marks a reading the server refuses as not saved, goes on with the rest, and lets it be undone', async () => {
    const store = await atTheChecks()
    vi.mocked(api.recordResult)
      .mockRejectedValueOnce(new ApiError(422, 'validation_failed', 'That reading does not fit this check.'))
      .mockImplementation(serverKeepsReadings())

    store.record(leak.checkCode, leak.position, leak.value)
    store.record(ball.checkCode, ball.position, ball.value)
    await flushPromises()

    expect(store.readings.get('swivel-leak@left')).toMatchObject({ state: 'failed', message: 'That reading does not fit this check.' })
    expect(store.readings.get('swivel-ball@left')?.state).toBe('saved')
    expect(store.failedCount).toBe(1)
    expect(await store.finish()).toBe(false)

    store.discard('swivel-leak@left')

    expect(store.readings.has('swivel-leak@left')).toBe(false)
    expect(store.failedCount).toBe(0)
  })

  it('keeps readings that are not on the server yet through a reload of the page', async () => {
    const store = await atTheChecks()
    vi.mocked(api.recordResult).mockRejectedValue(offline())
    store.record(leak.checkCode, leak.position, leak.value)
    await flushPromises()

    setActivePinia(createPinia())
    vi.mocked(api.recordResult).mockReset().mockImplementation(serverKeepsReadings())
    const reloaded = await atTheChecks()
    await flushPromises()

    expect(api.recordResult).toHaveBeenCalledWith(INSPECTION, leak)
    expect(reloaded.readings.get('swivel-leak@left')).toMatchObject({ severity: 'soon', state: 'saved' })
    expect(localStorage.length).toBe(0)
  })
})
