import type { DOMWrapper, VueWrapper } from '@vue/test-utils'

type Root = VueWrapper | Omit<DOMWrapper<Element>, 'exists'>

const text = (el: Element) => (el.textContent ?? '').replace(/\s+/g, ' ').trim()

/** The button (or link styled as one) whose visible text or aria-label is `name`. */
export function buttonNamed(root: Root, name: string | RegExp): DOMWrapper<HTMLElement> {
  const matches = (s: string) => (typeof name === 'string' ? s === name : name.test(s))
  const found = root
    .findAll<HTMLElement>('button, a[href], [role="button"]')
    .find((b) => matches(text(b.element)) || matches(b.attributes('aria-label') ?? ''))
  if (!found) throw new Error(`No button named ${String(name)}`)
  return found
}

/** The form control a <label> names (by its `for`), or one carrying that aria-label. */
export function controlLabelled(root: Root, label: string): Omit<DOMWrapper<HTMLInputElement>, 'exists'> {
  const byAria = root.findAll<HTMLInputElement>(`input[aria-label="${label}"], textarea[aria-label="${label}"]`)
  if (byAria[0]) return byAria[0]
  const labelEl = root.findAll('label').find((l) => text(l.element) === label && l.attributes('for'))
  if (!labelEl) throw new Error(`No control labelled ${label}`)
  return root.get<HTMLInputElement>(`[id="${labelEl.attributes('for') ?? ''}"]`)
}
