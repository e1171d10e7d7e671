import type { Window as HappyDomWindow } from 'happy-dom'

/** Resizes the happy-dom window; Vuetify reads the size when it is created, so call this first. */
export function setViewport(width: number, height: number): void {
  ;(window as unknown as HappyDomWindow).happyDOM.setViewport({ width, height })
}
