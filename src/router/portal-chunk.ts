/**
 * Everything the customer portal needs; the router imports this module lazily, so none of it
 * ships with the staff app and none of the staff screens ship with it.
 *
 * The pages exported directly are the ones the link in the estimate e-mail opens, and so make up
 * what a customer's phone downloads first. The rest load when first visited: a customer who
 * follows the e-mail never needs the sign-in form, and the confirm and payment pages come later
 * (the estimate page fetches the confirm page ahead once every item is decided).
 */
export { default as PortalLayout } from '@/layouts/PortalLayout.vue'
export { default as PortalWelcomePage } from '@/pages/portal/PortalWelcomePage.vue'
export { default as PortalOpenPage } from '@/pages/portal/PortalOpenPage.vue'
export { default as PortalEstimatePage } from '@/pages/portal/PortalEstimatePage.vue'

export const loadPortalSignInPage = () => import('@/pages/portal/PortalSignInPage.vue')
export const loadPortalSignInLinkPage = () => import('@/pages/portal/PortalSignInLinkPage.vue')
export const loadPortalAccountPage = () => import('@/pages/portal/PortalAccountPage.vue')
export const loadPortalConfirmPage = () => import('@/pages/portal/PortalConfirmPage.vue')
export const loadPortalPaidPage = () => import('@/pages/portal/PortalPaidPage.vue')
