import { nextTick } from 'vue'
import type { RouteLocationNormalized, RouteLocationRaw, RouteRecordRaw, Router } from 'vue-router'
import { type Audience, sendToSignInOnUnauthorized, useAuthStore } from '@/stores/auth'
import { useNotificationsStore } from '@/stores/notifications'
import { roleLabels, type Permission } from '@shared/auth/policy'

declare module 'vue-router' {
  interface RouteMeta {
    /** Shown in the browser tab before the product name. */
    title?: string
    /** Who must be signed in. Set on a parent, it covers every page added under it. */
    requires?: 'staff' | 'customer'
    /** What the staff member's role must allow, on top of `requires: 'staff'`. */
    permission?: Permission
    /** A sign-in page: asking for a link, or following one. */
    signIn?: { audience: Audience; step: 'request' | 'link' }
  }
}

const StaffLayout = () => import('@/layouts/StaffLayout.vue')

export const routes: RouteRecordRaw[] = [
  {
    path: '/',
    component: StaffLayout,
    meta: { requires: 'staff' },
    children: [
      {
        path: '',
        name: 'staff-home',
        component: () => import('@/pages/staff/StaffHomePage.vue'),
        meta: { title: 'Home' },
      },
      // Each list and its records share a parent, so the list's navigation item stays lit on a record.
      {
        path: 'customers',
        meta: { permission: 'customers:read' },
        children: [
          { path: '', name: 'customers', component: () => import('@/pages/staff/CustomersPage.vue'), meta: { title: 'Customers' } },
          {
            path: ':id',
            name: 'customer',
            component: () => import('@/pages/staff/CustomerDetailPage.vue'),
            props: true,
            meta: { title: 'Customer' },
          },
        ],
      },
      {
        path: 'vehicles',
        meta: { permission: 'vehicles:read' },
        children: [
          { path: '', name: 'vehicles', component: () => import('@/pages/staff/VehiclesPage.vue'), meta: { title: 'Vehicles' } },
          {
            path: ':id',
            name: 'vehicle',
            component: () => import('@/pages/staff/VehicleDetailPage.vue'),
            props: true,
            meta: { title: 'Vehicle' },
          },
        ],
      },
      {
        path: 'jobs',
        meta: { permission: 'jobs:read' },
        children: [
          { path: '', name: 'jobs', component: () => import('@/pages/staff/JobsPage.vue'), meta: { title: 'Jobs' } },
          { path: ':id', name: 'job', component: () => import('@/pages/staff/JobDetailPage.vue'), props: true, meta: { title: 'Job' } },
          {
            path: ':id/inspect',
            name: 'inspection',
            component: () => import('@/pages/staff/JobInspectionPage.vue'),
            props: true,
            meta: { title: 'Inspection', permission: 'inspections:write' },
          },
          {
            path: ':id/findings',
            name: 'job-findings',
            component: () => import('@/pages/staff/JobFindingsPage.vue'),
            props: true,
            meta: { title: 'Findings' },
          },
        ],
      },
      {
        path: 'estimates',
        meta: { permission: 'estimates:read' },
        children: [
          { path: '', name: 'estimates', component: () => import('@/pages/staff/EstimatesPage.vue'), meta: { title: 'Estimates' } },
          {
            path: ':id',
            name: 'estimate',
            component: () => import('@/pages/staff/EstimateDetailPage.vue'),
            props: true,
            meta: { title: 'Estimate' },
          },
        ],
      },
      {
        path: 'symptoms',
        name: 'symptom-guide',
        component: () => import('@/pages/staff/SymptomGuidePage.vue'),
        meta: { title: 'Symptom guide', permission: 'jobs:read' },
      },
      {
        path: 'check-templates',
        meta: { permission: 'catalogue:manage' },
        children: [
          {
            path: '',
            name: 'check-templates',
            component: () => import('@/pages/staff/CheckTemplatesPage.vue'),
            meta: { title: 'Check templates' },
          },
          {
            path: ':id',
            name: 'check-template',
            component: () => import('@/pages/staff/CheckTemplateEditPage.vue'),
            props: true,
            meta: { title: 'Edit check template' },
          },
        ],
      },
      {
        path: 'labour',
        meta: { permission: 'estimates:write' },
        children: [
          { path: '', name: 'labour', component: () => import('@/pages/staff/LabourTimesPage.vue'), meta: { title: 'Labour times' } },
          {
            path: 'actuals',
            name: 'labour-actuals',
            component: () => import('@/pages/staff/TimeComparisonPage.vue'),
            meta: { title: 'Clock time against book time', permission: 'catalogue:manage' },
          },
        ],
      },
      {
        path: 'parts',
        name: 'parts',
        component: () => import('@/pages/staff/PartsPage.vue'),
        meta: { title: 'Parts', permission: 'estimates:write' },
      },
      {
        path: 'pricing',
        name: 'pricing',
        component: () => import('@/pages/staff/PricingPage.vue'),
        meta: { title: 'Pricing', permission: 'estimates:write' },
      },
      {
        path: 'team',
        name: 'team',
        component: () => import('@/pages/staff/StaffTeamPage.vue'),
        meta: { title: 'Team', permission: 'staff:manage' },
      },
      {
        path: 'settings',
        name: 'settings',
        component: () => import('@/pages/staff/StaffSettingsPage.vue'),
        meta: { title: 'Workshop settings', permission: 'workshop:read' },
      },
      {
        path: 'activity',
        name: 'activity',
        component: () => import('@/pages/staff/StaffActivityPage.vue'),
        meta: { title: 'Activity log', permission: 'audit:read' },
      },
    ],
  },
  {
    // Outside the signed-in area above, so a page added there can never be reached signed out.
    path: '/sign-in',
    component: StaffLayout,
    children: [
      {
        path: '',
        name: 'sign-in',
        component: () => import('@/pages/staff/StaffSignInPage.vue'),
        meta: { title: 'Sign in', signIn: { audience: 'staff', step: 'request' } },
      },
      {
        path: 'link',
        name: 'sign-in-link',
        component: () => import('@/pages/staff/StaffSignInLinkPage.vue'),
        meta: { title: 'Signing in', signIn: { audience: 'staff', step: 'link' } },
      },
    ],
  },
  {
    // Customers only ever load the portal. Each page is its own lazy chunk (none of the staff
    // screens in it), so a page brings only what it uses: the sign-in form does not carry the
    // estimate engine, and the page the e-mail link opens does not carry the sign-in form.
    path: '/portal',
    component: () => import('@/layouts/PortalLayout.vue'),
    children: [
      {
        path: '',
        name: 'portal-welcome',
        component: () => import('@/pages/portal/PortalWelcomePage.vue'),
        meta: { title: 'Your repair estimate' },
      },
      {
        path: 'sign-in',
        name: 'portal-sign-in',
        component: () => import('@/pages/portal/PortalSignInPage.vue'),
        meta: { title: 'Sign in', signIn: { audience: 'customer', step: 'request' } },
      },
      {
        path: 'sign-in/link',
        name: 'portal-sign-in-link',
        component: () => import('@/pages/portal/PortalSignInLinkPage.vue'),
        meta: { title: 'Signing in', signIn: { audience: 'customer', step: 'link' } },
      },
      {
        path: 'account',
        name: 'portal-account',
        component: () => import('@/pages/portal/PortalAccountPage.vue'),
        meta: { title: 'Your account', requires: 'customer' },
      },
      {
        // The link from the estimate e-mail; the page signs the customer in with it.
        path: 'open',
        name: 'portal-open',
        component: () => import('@/pages/portal/PortalOpenPage.vue'),
        meta: { title: 'Your repair estimate' },
      },
      {
        path: 'estimates/:id',
        meta: { requires: 'customer' },
        children: [
          {
            path: '',
            name: 'portal-estimate',
            component: () => import('@/pages/portal/PortalEstimatePage.vue'),
            props: true,
            meta: { title: 'Your repair estimate' },
          },
          {
            path: 'confirm',
            name: 'portal-confirm',
            component: () => import('@/pages/portal/PortalConfirmPage.vue'),
            props: true,
            meta: { title: 'Review and confirm' },
          },
          {
            path: 'paid',
            name: 'portal-paid',
            component: () => import('@/pages/portal/PortalPaidPage.vue'),
            props: true,
            meta: { title: 'Your deposit' },
          },
        ],
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

/** Where the signed-in person belongs, or null to let the navigation through. */
async function redirectFor(to: RouteLocationNormalized): Promise<RouteLocationRaw | null> {
  const { requires, permission, signIn } = to.meta
  const needsPrincipal = requires !== undefined || signIn?.step === 'request'
  if (!needsPrincipal) return null

  const auth = useAuthStore()
  await auth.load()

  if (signIn?.step === 'request') {
    // Already signed in this way: asking for another link would only be a detour.
    if (signIn.audience === 'staff' && auth.staff) return { name: 'staff-home' }
    if (signIn.audience === 'customer' && auth.customer) return { name: 'portal-account' }
    return null
  }

  if (requires === 'customer') {
    return auth.customer ? null : { name: 'portal-sign-in', query: { redirect: to.fullPath } }
  }

  const staff = auth.staff
  if (!staff) {
    if (auth.customer) {
      useNotificationsStore().push('info', 'That page is for the workshop team. Here is your own account.')
      return { name: 'portal-account' }
    }
    return { name: 'sign-in', query: { redirect: to.fullPath } }
  }
  if (permission && !auth.can(permission)) {
    const page = to.meta.title ?? 'That page'
    useNotificationsStore().push('info', `${page} is not available for your role (${roleLabels[staff.role]}).`)
    return { name: 'staff-home' }
  }
  return null
}

export function installGuards(router: Router): void {
  sendToSignInOnUnauthorized(router)

  router.beforeEach(async (to) => (await redirectFor(to)) ?? true)

  router.afterEach((to, from, failure) => {
    if (failure) return
    document.title = to.meta.title ? `${to.meta.title} · Tickover` : 'Tickover'
    // After moving to another page (not on first load, nor when only the query changes), start a
    // keyboard or screen reader user at the new page's content rather than back at the top bar.
    if (from.matched.length > 0 && from.path !== to.path) {
      void nextTick(() => document.getElementById('main')?.focus({ preventScroll: true }))
    }
  })
}
