import type { RouteRecordRaw } from 'vue-router'
import { routes } from '@/router'

/**
 * Imports every lazily loaded page once. The first import compiles Vuetify and the page, which can
 * take longer than a test's own time limit; a `beforeAll` has a longer one.
 */
export async function preloadRouteComponents(records: RouteRecordRaw[] = routes): Promise<void> {
  for (const record of records) {
    const component = record.component
    if (typeof component === 'function') await (component as () => Promise<unknown>)()
    if (record.children) await preloadRouteComponents(record.children)
  }
}
