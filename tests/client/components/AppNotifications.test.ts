// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { defineComponent, h } from 'vue'
import { VApp } from 'vuetify/components'
import AppNotifications from '@/components/app/AppNotifications.vue'
import { useNotificationsStore } from '@/stores/notifications'
import { createTestVuetify } from '../support/vuetify'

// The snackbar positions itself inside the app layout, as it does in App.vue.
const Host = defineComponent(() => () => h(VApp, () => h(AppNotifications)))

let unmount: (() => void) | undefined

function mountHost() {
  const pinia = createPinia()
  setActivePinia(pinia)
  const wrapper = mount(Host, { attachTo: document.body, global: { plugins: [createTestVuetify(), pinia] } })
  unmount = () => wrapper.unmount()
  return useNotificationsStore()
}

function snackbar(): HTMLElement | null {
  return document.body.querySelector('.v-snackbar [role="status"]')
}

beforeEach(() => {
  // happy-dom has no visualViewport; Vuetify's overlays read it as `visualViewport?.…`, which
  // still throws for an undeclared global. Declaring it empty matches a browser without it.
  vi.stubGlobal('visualViewport', undefined)
})

afterEach(() => {
  unmount?.()
  vi.unstubAllGlobals()
})

describe('AppNotifications', () => {
  it('shows the queued message and, once closed, the next one', async () => {
    const notifications = mountHost()
    notifications.push('error', 'The database cannot be reached right now.')
    notifications.push('info', 'Estimate sent.')
    await flushPromises()

    expect(snackbar()?.textContent).toContain('The database cannot be reached right now.')

    const close = [...document.body.querySelectorAll<HTMLButtonElement>('.v-snackbar button')].find(
      (b) => b.textContent?.trim() === 'Close',
    )
    close?.click()
    await flushPromises()

    expect(notifications.queue.map((n) => n.text)).toEqual(['Estimate sent.'])
    expect(snackbar()?.textContent).toContain('Estimate sent.')
  })

  it('shows nothing when the queue is empty', async () => {
    mountHost()
    await flushPromises()

    expect(snackbar()).toBeNull()
  })
})
