/** Everything the customer portal needs; the router imports this module lazily as one chunk. */
export { default as PortalLayout } from '@/layouts/PortalLayout.vue'
export { default as PortalWelcomePage } from '@/pages/portal/PortalWelcomePage.vue'
