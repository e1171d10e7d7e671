// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { createPinia } from 'pinia'
import { afterEach, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest'
import { createMemoryHistory, createRouter } from 'vue-router'
import { requestSignInLink, verifySignInLink } from '@/api/auth'
import { ApiError } from '@/api/http'
import { getHealth, getReady } from '@/api/system'
import App from '@/App.vue'
import { installGuards, routes } from '@/router'
import { alertsIn, buttonByName, fieldByLabel, fieldMessages, headingText, typeInto } from '../support/dom'
import { customerPrincipal, staffPrincipal } from '../support/principals'
import { preloadRouteComponents } from '../support/router'
import { createTestVuetify } from '../support/vuetify'

vi.mock('@/api/auth', () => ({
  getMe: vi.fn(async () => null),
  requestSignInLink: vi.fn(),
  verifySignInLink: vi.fn(),
  signOut: vi.fn(),
}))
// Signing in lands on a page that loads its own data.
vi.mock('@/api/system', () => ({ getHealth: vi.fn(), getReady: vi.fn() }))
vi.mock('@/api/portal-account', () => ({ listMyVehicles: vi.fn(async () => []), listMyEstimates: vi.fn(async () => []) }))
vi.mock('@/api/audit', () => ({ listAuditEvents: vi.fn(async () => ({ items: [], total: 0, page: 1, pageSize: 25 })) }))
vi.mock('@/api/staff', () => ({ listStaff: vi.fn(async () => []) }))

let unmount: (() => void) | undefined

async function mountAt(path: string) {
  const router = createRouter({ history: createMemoryHistory(), routes })
  installGuards(router)
  const wrapper = mount(App, { attachTo: document.body, global: { plugins: [createTestVuetify(), createPinia(), router] } })
  unmount = () => wrapper.unmount()
  await router.push(path)
  await flushPromises()
  return { wrapper, router }
}

async function submitEmail(value: string) {
  typeInto(fieldByLabel('E-mail address'), value)
  await flushPromises()
  buttonByName('Send me a sign-in link').click()
  await flushPromises()
}

const token = 'eyJhbGciOiJIUzI1NiJ9.invented-test-token.signature'

beforeAll(() => preloadRouteComponents())

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
  vi.mocked(getHealth).mockResolvedValue({ status: 'ok', uptimeSeconds: 5, version: '0.1.0' })
  vi.mocked(getReady).mockResolvedValue({ status: 'ready', database: 'ok' })
  vi.mocked(requestSignInLink).mockReset()
  vi.mocked(verifySignInLink).mockReset()
  localStorage.clear()
})

afterEach(() => {
  unmount?.()
  unmount = undefined
  vi.unstubAllGlobals()
})

describe('staff sign-in page', () => {
  it('has a labelled e-mail field that phones fill in and type into as an address', async () => {
    await mountAt('/sign-in')

    const field = fieldByLabel('E-mail address')
    expect(field.getAttribute('type')).toBe('email')
    expect(field.getAttribute('autocomplete')).toBe('email')
    expect(field.getAttribute('inputmode')).toBe('email')
    expect(document.querySelector('main')?.contains(field)).toBe(true)
  })

  it('sends the link, then says to check the e-mail and that the link works once for 10 minutes', async () => {
    vi.mocked(requestSignInLink).mockResolvedValue({ message: 'On its way' })
    await mountAt('/sign-in')

    await submitEmail('  Wren@Hollowmere.TEST ')

    expect(requestSignInLink).toHaveBeenCalledWith('staff', 'wren@hollowmere.test')
    expect(headingText(1)).toEqual(['Check your e-mail'])
    const main = document.querySelector('main')!.textContent ?? ''
    expect(main).toContain('wren@hollowmere.test')
    expect(main).toMatch(/works once, for 10 minutes/)
    expect(document.activeElement?.textContent).toBe('Check your e-mail')
  })

  it('sends again on request and says a new link is on its way', async () => {
    vi.mocked(requestSignInLink).mockResolvedValue({ message: 'On its way' })
    await mountAt('/sign-in')
    await submitEmail('wren@hollowmere.test')

    buttonByName('Send a new link').click()
    await flushPromises()

    expect(requestSignInLink).toHaveBeenCalledTimes(2)
    expect(vi.mocked(requestSignInLink).mock.calls[1]).toEqual(['staff', 'wren@hollowmere.test'])
    expect(document.querySelector('[role="status"]')?.textContent).toMatch(/new link has been sent/)
  })

  it('does not claim a new link was sent when the resend was refused', async () => {
    vi.mocked(requestSignInLink)
      .mockResolvedValueOnce({ message: 'On its way' })
      .mockResolvedValueOnce({ message: 'On its way' })
      .mockRejectedValue(new ApiError(429, 'too_many_requests', 'Too many attempts. Please wait a few minutes and try again.'))
    await mountAt('/sign-in')
    await submitEmail('wren@hollowmere.test')
    buttonByName('Send a new link').click()
    await flushPromises()

    buttonByName('Send a new link').click()
    await flushPromises()

    expect(alertsIn()).toEqual(['Too many attempts. Please wait a few minutes and try again.'])
    expect(document.querySelector('[role="status"]')?.textContent).toBe('')
  })

  it('goes back to the form to use another address', async () => {
    vi.mocked(requestSignInLink).mockResolvedValue({ message: 'On its way' })
    await mountAt('/sign-in')
    await submitEmail('wren@hollowmere.test')

    buttonByName('Use a different e-mail address').click()
    await flushPromises()

    expect(fieldByLabel('E-mail address').value).toBe('wren@hollowmere.test')
    expect(headingText(1)).toEqual(['Sign in to your workshop'])
  })

  it('checks the address with the shared rules before asking the server', async () => {
    await mountAt('/sign-in')

    await submitEmail('wren at hollowmere')

    expect(requestSignInLink).not.toHaveBeenCalled()
    expect(fieldMessages(fieldByLabel('E-mail address'))).toBe('Enter a valid e-mail address, like name@example.com')
  })

  it("shows the server's 422 message on the e-mail field", async () => {
    vi.mocked(requestSignInLink).mockRejectedValue(
      new ApiError(422, 'validation_failed', 'Some of the details are not right.', [
        { path: ['body', 'email'], message: 'That e-mail address is too long' },
      ]),
    )
    await mountAt('/sign-in')

    await submitEmail('wren@hollowmere.test')

    expect(fieldMessages(fieldByLabel('E-mail address'))).toBe('That e-mail address is too long')
    expect(document.body.textContent).not.toContain('Some of the details are not right.')
    expect(headingText(1)).toEqual(['Sign in to your workshop'])
  })

  it('says plainly when there have been too many tries', async () => {
    vi.mocked(requestSignInLink).mockRejectedValue(
      new ApiError(429, 'too_many_requests', 'Too many attempts. Please wait a few minutes and try again.'),
    )
    await mountAt('/sign-in')

    await submitEmail('wren@hollowmere.test')

    expect(alertsIn()).toEqual(['Too many attempts. Please wait a few minutes and try again.'])
  })

  it('remembers the page the person was sent here from, for after the link', async () => {
    vi.mocked(requestSignInLink).mockResolvedValue({ message: 'On its way' })
    await mountAt('/activity')

    await submitEmail('wren@hollowmere.test')

    expect(JSON.parse(localStorage.getItem('tickover.sign-in.redirect') ?? '{}')).toMatchObject({
      audience: 'staff',
      path: '/activity',
    })
  })
})

describe('staff sign-in link page', () => {
  it('takes the token out of the address before using it, then goes home', async () => {
    let addressWhileChecking = ''
    const router = createRouter({ history: createMemoryHistory(), routes })
    vi.mocked(verifySignInLink).mockImplementation(async () => {
      addressWhileChecking = router.currentRoute.value.fullPath
      return staffPrincipal('owner')
    })
    installGuards(router)
    const wrapper = mount(App, { attachTo: document.body, global: { plugins: [createTestVuetify(), createPinia(), router] } })
    unmount = () => wrapper.unmount()
    await router.push(`/sign-in/link?token=${token}`)
    await flushPromises()

    expect(verifySignInLink).toHaveBeenCalledWith(token)
    expect(addressWhileChecking).toBe('/sign-in/link')
    await vi.waitFor(() => expect(router.currentRoute.value.name).toBe('staff-home'))
  })

  it('replaces the history entry, so Back cannot return to the token', async () => {
    vi.mocked(verifySignInLink).mockResolvedValue(staffPrincipal('owner'))
    const history = createMemoryHistory()
    const router = createRouter({ history, routes })
    installGuards(router)
    const wrapper = mount(App, { attachTo: document.body, global: { plugins: [createTestVuetify(), createPinia(), router] } })
    unmount = () => wrapper.unmount()
    await router.push('/portal')
    await router.push(`/sign-in/link?token=${token}`)
    await flushPromises()
    await vi.waitFor(() => expect(router.currentRoute.value.name).toBe('staff-home'))

    router.back()

    await vi.waitFor(() => expect(router.currentRoute.value.fullPath).toBe('/portal'))
  })

  it('carries on to the page the person was going to', async () => {
    vi.mocked(requestSignInLink).mockResolvedValue({ message: 'On its way' })
    vi.mocked(verifySignInLink).mockResolvedValue(staffPrincipal('owner'))
    const first = await mountAt('/activity')
    await submitEmail('wren@hollowmere.test')
    unmount?.()

    const { router } = await mountAt(`/sign-in/link?token=${token}`)

    await vi.waitFor(() => expect(router.currentRoute.value.name).toBe('activity'))
    expect(first.router).not.toBe(router)
  })

  it('explains a used or expired link kindly and offers a new one', async () => {
    vi.mocked(verifySignInLink).mockRejectedValue(
      new ApiError(400, 'link_invalid', 'This sign-in link has expired or has already been used.'),
    )
    const { router } = await mountAt(`/sign-in/link?token=${token}`)

    expect(router.currentRoute.value.fullPath).toBe('/sign-in/link')
    expect(headingText(1)).toEqual(['This link has run out'])
    expect(document.querySelector('main')?.textContent).toMatch(/work once, for 10 minutes/)
    expect(buttonByName('Send me a new link').getAttribute('href')).toBe('/sign-in')
  })

  it('says a link without its token is incomplete, without asking the server', async () => {
    await mountAt('/sign-in/link')

    expect(verifySignInLink).not.toHaveBeenCalled()
    expect(headingText(1)).toEqual(['This link is incomplete'])
  })

  it('offers to try again when the server could not be reached', async () => {
    vi.mocked(verifySignInLink)
      .mockRejectedValueOnce(new ApiError(0, 'network_error', 'The server cannot be reached.'))
      .mockResolvedValue(staffPrincipal('owner'))
    const { router } = await mountAt(`/sign-in/link?token=${token}`)
    expect(alertsIn()).toEqual(['The server cannot be reached.'])

    buttonByName('Try again').click()
    await flushPromises()

    expect(verifySignInLink).toHaveBeenLastCalledWith(token)
    await vi.waitFor(() => expect(router.currentRoute.value.name).toBe('staff-home'))
  })
})

describe('portal sign-in', () => {
  it('asks for a customer link inside the portal', async () => {
    vi.mocked(requestSignInLink).mockResolvedValue({ message: 'On its way' })
    await mountAt('/portal/sign-in')

    await submitEmail('juno@example.test')

    expect(requestSignInLink).toHaveBeenCalledWith('customer', 'juno@example.test')
    expect(headingText(1)).toEqual(['Check your e-mail'])
    expect(document.querySelector('nav')).toBeNull()
  })

  it('follows a customer link to the account page, with the token gone from the address', async () => {
    vi.mocked(verifySignInLink).mockResolvedValue(customerPrincipal)
    const { router } = await mountAt(`/portal/sign-in/link?token=${token}`)

    await vi.waitFor(() => expect(router.currentRoute.value.name).toBe('portal-account'))
    expect(router.currentRoute.value.fullPath).not.toContain('token')
  })

  it('offers a fresh customer link when the link has run out', async () => {
    vi.mocked(verifySignInLink).mockRejectedValue(new ApiError(400, 'link_invalid', 'Expired or used.'))
    await mountAt(`/portal/sign-in/link?token=${token}`)

    expect(buttonByName('Send me a new link').getAttribute('href')).toBe('/portal/sign-in')
  })
})
