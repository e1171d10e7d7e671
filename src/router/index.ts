import type { RouteRecordRaw, Router } from 'vue-router'

declare module 'vue-router' {
  interface RouteMeta {
    /** Shown in the browser tab before the product name. */
    title?: string
  }
}

// Customers only ever load the portal, so it ships as one chunk of its own with none of the
// staff screens in it; see portal-chunk.ts.
const portalChunk = () => import('./portal-chunk')

export const routes: RouteRecordRaw[] = [
  {
    path: '/',
    component: () => import('@/layouts/StaffLayout.vue'),
    children: [
      {
        path: '',
        name: 'staff-home',
        component: () => import('@/pages/staff/StaffHomePage.vue'),
        meta: { title: 'Home' },
      },
    ],
  },
  {
    path: '/portal',
    component: () => portalChunk().then((m) => m.PortalLayout),
    children: [
      {
        path: '',
        name: 'portal-welcome',
        component: () => portalChunk().then((m) => m.PortalWelcomePage),
        meta: { title: 'Your repair estimate' },
      },
    ],
  },
  {
    path: '/:pathMatch(.*)*',
    name: 'not-found',
    component: () => import('@/pages/NotFoundPage.vue'),
    meta: { title: 'Page not found' },
  },
]

export function installGuards(router: Router): void {
  router.afterEach((to) => {
    document.title = to.meta.title ? `${to.meta.title} · Tickover` : 'Tickover'
  })
}
