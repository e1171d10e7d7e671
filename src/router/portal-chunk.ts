/** Everything the customer portal needs; the router imports this module lazily as one chunk. */
export { default as PortalLayout } from '@/layouts/PortalLayout.vue'
export { default as PortalWelcomePage } from '@/pages/portal/PortalWelcomePage.vue'
export { default as PortalSignInPage } from '@/pages/portal/PortalSignInPage.vue'
export { default as PortalSignInLinkPage } from '@/pages/portal/PortalSignInLinkPage.vue'
export { default as PortalAccountPage } from '@/pages/portal/PortalAccountPage.vue'
