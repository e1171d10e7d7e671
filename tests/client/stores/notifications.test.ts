import { createPinia, setActivePinia } from 'pinia'
import { beforeEach, describe, expect, it } from 'vitest'
import { useNotificationsStore } from '@/stores/notifications'

beforeEach(() => {
  setActivePinia(createPinia())
})

describe('useNotificationsStore', () => {
  it('shows the oldest message first and moves on when it is dismissed', () => {
    const notifications = useNotificationsStore()
    notifications.push('error', 'First')
    notifications.push('info', 'Second')

    expect(notifications.current?.text).toBe('First')
    notifications.dismiss(notifications.current!.id)
    expect(notifications.current?.text).toBe('Second')
    notifications.dismiss(notifications.current!.id)
    expect(notifications.current).toBeNull()
  })

  it('does not queue the same message twice while it is still waiting', () => {
    const notifications = useNotificationsStore()
    notifications.push('error', 'The server cannot be reached.')
    notifications.push('error', 'The server cannot be reached.')

    expect(notifications.queue).toHaveLength(1)
  })

  it('queues the same message again once the first has been dismissed', () => {
    const notifications = useNotificationsStore()
    notifications.push('error', 'The server cannot be reached.')
    notifications.dismiss(notifications.current!.id)
    notifications.push('error', 'The server cannot be reached.')

    expect(notifications.queue).toHaveLength(1)
  })
})
