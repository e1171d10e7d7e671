import { defineStore } from 'pinia'
import { computed, ref } from 'vue'

export type NotificationKind = 'error' | 'success' | 'info'

export interface AppNotification {
  id: number
  kind: NotificationKind
  text: string
}

/** The one queue every store reports to; AppNotifications shows its head. */
export const useNotificationsStore = defineStore('notifications', () => {
  const queue = ref<AppNotification[]>([])
  let nextId = 1

  const current = computed(() => queue.value[0] ?? null)

  function push(kind: NotificationKind, text: string): void {
    // Retrying while the server is down would otherwise stack the same message many times.
    if (queue.value.some((n) => n.kind === kind && n.text === text)) return
    queue.value.push({ id: nextId++, kind, text })
  }

  function dismiss(id: number): void {
    queue.value = queue.value.filter((n) => n.id !== id)
  }

  return { queue, current, push, dismiss }
})
