/**
 * Queries by what a person sees or hears (label, accessible name, text), searching the whole document
 * because Vuetify teleports dialogs and menus out of the mounted component.
 */

function text(el: Element): string {
  return (el.textContent ?? '').replace(/\s+/g, ' ').trim()
}

function matches(value: string, name: string | RegExp): boolean {
  return typeof name === 'string' ? value === name : name.test(value)
}

/** The form control a visible <label> names (Vuetify links them with `for`). */
export function fieldByLabel(name: string | RegExp, root: ParentNode = document): HTMLInputElement | HTMLTextAreaElement {
  const labels = [...root.querySelectorAll('label')].filter((l) => matches(text(l), name) && l.htmlFor)
  const controls = labels
    .map((l) => document.getElementById(l.htmlFor))
    .filter((c): c is HTMLInputElement | HTMLTextAreaElement => c instanceof HTMLInputElement || c instanceof HTMLTextAreaElement)
  if (controls.length !== 1) throw new Error(`Expected one field labelled ${String(name)}, found ${controls.length}`)
  return controls[0]!
}

/** The messages shown under a field (Vuetify's `.v-input` wraps the control and its messages, apart from any counter). */
export function fieldMessages(field: Element): string {
  const input = field.closest('.v-input')
  const messages = input?.querySelector('.v-messages')
  return messages ? text(messages) : ''
}

function accessibleName(el: Element): string {
  return el.getAttribute('aria-label') ?? text(el)
}

/** A button (or link styled as one) by its accessible name. */
export function buttonByName(name: string | RegExp, root: ParentNode = document): HTMLElement {
  const found = [...root.querySelectorAll<HTMLElement>('button, a, [role="button"]')].filter((b) => matches(accessibleName(b), name))
  if (found.length !== 1) throw new Error(`Expected one button named ${String(name)}, found ${found.length}`)
  return found[0]!
}

export function queryButtonByName(name: string | RegExp, root: ParentNode = document): HTMLElement | null {
  return [...root.querySelectorAll<HTMLElement>('button, a, [role="button"]')].find((b) => matches(accessibleName(b), name)) ?? null
}

/** The open dialog (Vuetify puts role="dialog" on the overlay it teleports to the body). */
export function openDialog(): HTMLElement | null {
  return [...document.querySelectorAll<HTMLElement>('[role="dialog"]')].find((d) => d.classList.contains('v-overlay--active')) ?? null
}

export function headingText(level: 1 | 2, root: ParentNode = document): string[] {
  return [...root.querySelectorAll(`h${level}`)].map(text)
}

/** Types into a field the way a browser does: set the value, then fire `input`. */
export function typeInto(field: HTMLInputElement | HTMLTextAreaElement, value: string): void {
  field.value = value
  field.dispatchEvent(new Event('input', { bubbles: true }))
}

/** What is being announced; Vuetify keeps an empty live region under every field, so empty ones are left out. */
export function alertsIn(root: ParentNode = document): string[] {
  return [...root.querySelectorAll('[role="alert"]')].map((a) => text(a)).filter(Boolean)
}

/** Opens a Vuetify select the way a pointer does, then picks the option with that text. */
export async function chooseOption(field: Element, option: string, settle: () => Promise<unknown>): Promise<void> {
  const control = field.closest('.v-field')
  if (!control) throw new Error('Not a Vuetify field')
  control.dispatchEvent(new MouseEvent('mousedown', { bubbles: true }))
  await settle()
  const found = [...document.querySelectorAll<HTMLElement>('[role="option"]')].filter((o) => text(o) === option)
  if (found.length !== 1) throw new Error(`Expected one option ${option}, found ${found.length}`)
  found[0]!.click()
  await settle()
}

/** Messages announced politely, such as the notification snackbar's. */
export function statusMessages(root: ParentNode = document): string[] {
  return [...root.querySelectorAll('[role="status"]')].map((s) => text(s)).filter(Boolean)
}
