import { nextTick, watch, type WatchSource } from 'vue'

/**
 * Puts keyboard focus back where it was before a dialog opened. Vuetify does this only for a dialog
 * with an activator; ours are opened from list rows, so without this focus falls to the top of the page.
 */
export function useReturnFocus(isOpen: WatchSource<boolean>): void {
  let returnTo: HTMLElement | null = null
  watch(isOpen, async (open, wasOpen) => {
    if (open && !wasOpen) {
      returnTo = document.activeElement instanceof HTMLElement ? document.activeElement : null
    } else if (!open && wasOpen) {
      await nextTick()
      if (returnTo?.isConnected) returnTo.focus()
      returnTo = null
    }
  })
}
