import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import { ApiError } from '@/api/http'
import { getHealth, getReady, type Health, type Ready } from '@/api/system'
import { useNotificationsStore } from './notifications'

/** `unknown` until a check has answered, or when the server cannot be asked about the database. */
export type ServiceState = 'unknown' | 'up' | 'down'

export const useSystemStore = defineStore('system', () => {
  const notifications = useNotificationsStore()

  const health = ref<Health | null>(null)
  const ready = ref<Ready | null>(null)
  const hasChecked = ref(false)
  const isLoading = ref(false)
  const error = ref<ApiError | null>(null)

  const serverState = computed<ServiceState>(() => {
    if (health.value) return 'up'
    return hasChecked.value ? 'down' : 'unknown'
  })
  const databaseState = computed<ServiceState>(() => {
    if (ready.value) return 'up'
    return health.value ? 'down' : 'unknown'
  })

  async function check(): Promise<void> {
    isLoading.value = true
    error.value = null
    try {
      // Both at once: on a slow workshop connection the answer comes back in one round trip.
      const [healthResult, readyResult] = await Promise.allSettled([getHealth(), getReady()])
      health.value = healthResult.status === 'fulfilled' ? healthResult.value : null
      ready.value = readyResult.status === 'fulfilled' ? readyResult.value : null
      hasChecked.value = true

      const failure = [healthResult, readyResult].find((r): r is PromiseRejectedResult => r.status === 'rejected')
      if (failure) {
        // Anything but an ApiError is a bug in the app and must not pass for a server problem.
        if (!(failure.reason instanceof ApiError)) throw failure.reason
        error.value = failure.reason
        notifications.push('error', failure.reason.message)
      }
    } finally {
      isLoading.value = false
    }
  }

  return { health, ready, hasChecked, isLoading, error, serverState, databaseState, check }
})
