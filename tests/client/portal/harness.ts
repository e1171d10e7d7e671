import { flushPromises, mount } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { createMemoryHistory, createRouter } from 'vue-router'
import App from '@/App.vue'
import { installGuards, routes } from '@/router'
import { createTestVuetify } from '../support/vuetify'

const text = (el: Element) => (el.textContent ?? '').replace(/\s+/g, ' ').trim()

let unmountLast: (() => void) | undefined

/** The whole app at `path`, as a phone would open it; API modules are mocked by each test file. */
export async function mountPortalAt(path: string) {
  const pinia = createPinia()
  setActivePinia(pinia)
  const router = createRouter({ history: createMemoryHistory(), routes })
  installGuards(router)
  await router.push(path)
  const wrapper = mount(App, { attachTo: document.body, global: { plugins: [createTestVuetify(), pinia, router] } })
  unmountLast = () => wrapper.unmount()
  await flushPromises()
  return { wrapper, router, pinia }
}

export function unmountPortal(): void {
  unmountLast?.()
  unmountLast = undefined
}

/** The element a heading with this text names through aria-labelledby (an item card, a section). */
export function regionNamed(name: string | RegExp, selector = 'article, section'): HTMLElement {
  const matches = (s: string) => (typeof name === 'string' ? s === name : name.test(s))
  const found = [...document.querySelectorAll<HTMLElement>(`${selector}`)].filter((el) => {
    const id = el.getAttribute('aria-labelledby')
    const label = id ? document.getElementById(id) : null
    return (label && matches(text(label))) || matches(el.getAttribute('aria-label') ?? '')
  })
  if (found.length !== 1) throw new Error(`Expected one region named ${String(name)}, found ${found.length}`)
  return found[0]!
}

/** The summary bar's figures as shown: "Approved total" and "Deposit" amounts. */
export function summaryFigure(label: 'Approved total' | 'Deposit'): string {
  const bar = regionNamed('Your total')
  const row = [...bar.querySelectorAll('p')].find((p) => p.querySelector('span')?.textContent?.trim() === label)
  return row?.querySelector('strong')?.textContent?.trim() ?? ''
}

export { text }
