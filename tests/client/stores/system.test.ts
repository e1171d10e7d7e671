import { createPinia, setActivePinia } from 'pinia'
import { beforeEach, describe, expect, it, vi } from 'vitest'
import { ApiError } from '@/api/http'
import { getHealth, getReady } from '@/api/system'
import { useNotificationsStore } from '@/stores/notifications'
import { useSystemStore } from '@/stores/system'

vi.mock('@/api/system', () => ({ getHealth: vi.fn(), getReady: vi.fn() }))

const health = { status: 'ok' as const, uptimeSeconds: 42, version: '0.1.0' }
const ready = { status: 'ready' as const, database: 'ok' as const }
const notReady = new ApiError(503, 'not_ready', 'The database cannot be reached right now.')
const unreachable = new ApiError(0, 'network_error', 'The server cannot be reached. Check the connection and try again.')

beforeEach(() => {
  setActivePinia(createPinia())
  vi.mocked(getHealth).mockReset()
  vi.mocked(getReady).mockReset()
})

describe('useSystemStore', () => {
  it('starts unknown, before any check', () => {
    const system = useSystemStore()

    expect(system.serverState).toBe('unknown')
    expect(system.databaseState).toBe('unknown')
    expect(system.isLoading).toBe(false)
  })

  it('reports server and database up when both answer', async () => {
    vi.mocked(getHealth).mockResolvedValue(health)
    vi.mocked(getReady).mockResolvedValue(ready)
    const system = useSystemStore()

    const checking = system.check()
    expect(system.isLoading).toBe(true)
    await checking

    expect(system.isLoading).toBe(false)
    expect(system.serverState).toBe('up')
    expect(system.databaseState).toBe('up')
    expect(system.health?.version).toBe('0.1.0')
    expect(system.error).toBeNull()
    expect(useNotificationsStore().queue).toEqual([])
  })

  it('on 503 from /ready sets the error, marks the database down and pushes a notification', async () => {
    vi.mocked(getHealth).mockResolvedValue(health)
    vi.mocked(getReady).mockRejectedValue(notReady)
    const system = useSystemStore()

    await system.check()

    expect(system.serverState).toBe('up')
    expect(system.databaseState).toBe('down')
    expect(system.error).toBe(notReady)
    expect(system.isLoading).toBe(false)
    expect(useNotificationsStore().queue).toMatchObject([{ kind: 'error', text: 'The database cannot be reached right now.' }])
  })

  it('when the server cannot be reached, marks it down and leaves the database unknown', async () => {
    vi.mocked(getHealth).mockRejectedValue(unreachable)
    vi.mocked(getReady).mockRejectedValue(unreachable)
    const system = useSystemStore()

    await system.check()

    expect(system.serverState).toBe('down')
    expect(system.databaseState).toBe('unknown')
    expect(system.error?.code).toBe('network_error')
    expect(useNotificationsStore().queue).toHaveLength(1)
  })

  it('clears an earlier failure once a later check succeeds', async () => {
    vi.mocked(getHealth).mockRejectedValueOnce(unreachable).mockResolvedValue(health)
    vi.mocked(getReady).mockRejectedValueOnce(unreachable).mockResolvedValue(ready)
    const system = useSystemStore()

    await system.check()
    await system.check()

    expect(system.serverState).toBe('up')
    expect(system.databaseState).toBe('up')
    expect(system.error).toBeNull()
  })

  it('lets a bug in the app surface instead of calling it a server problem', async () => {
    vi.mocked(getHealth).mockRejectedValue(new TypeError('x is not a function'))
    vi.mocked(getReady).mockResolvedValue(ready)
    const system = useSystemStore()

    await expect(system.check()).rejects.toThrow(TypeError)
    expect(system.isLoading).toBe(false)
    expect(useNotificationsStore().queue).toEqual([])
  })
})
