import { createVuetify } from 'vuetify'
import { vuetifyOptions } from '@/plugins/vuetify'

/** A fresh Vuetify per test, built from the app's own options so theme and icons are the real ones. */
export function createTestVuetify() {
  return createVuetify(vuetifyOptions)
}
