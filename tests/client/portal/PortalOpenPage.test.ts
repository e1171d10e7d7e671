// @vitest-environment happy-dom
import { flushPromises } from '@vue/test-utils'
import { afterEach, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest'
import { getMe } from '@/api/auth'
import { ApiError } from '@/api/http'
import { getMyEstimate, openEstimateLink, renewEstimateLink } from '@/api/portal'
import type * as PortalApi from '@/api/portal'
import { useAuthStore } from '@/stores/auth'
import { alertsIn, buttonByName, headingText, queryButtonByName, statusMessages } from '../support/dom'
import { customerPrincipal } from '../support/principals'
import { preloadRouteComponents } from '../support/router'
import { portalEstimate, portalIds } from './fixtures'
import { mountPortalAt, text, unmountPortal } from './harness'

vi.mock('@/api/auth', () => ({ getMe: vi.fn(), requestSignInLink: vi.fn(), verifySignInLink: vi.fn(), signOut: vi.fn() }))
vi.mock('@/api/portal', async (importOriginal) => ({
  ...(await importOriginal<typeof PortalApi>()),
  openEstimateLink: vi.fn(),
  renewEstimateLink: vi.fn(),
  getMyEstimate: vi.fn(),
}))

const token = 'eTkR7v2QmZ9xWc4pLs8nHb3JdF6gYa1u-invented'
const renewAnswer =
  'If that link belongs to an estimate that can still be decided on, a fresh link is on its way to the e-mail address the workshop has for you.'

beforeAll(() => preloadRouteComponents())

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
  vi.mocked(getMe).mockResolvedValue(null)
  vi.mocked(openEstimateLink).mockReset()
  vi.mocked(renewEstimateLink).mockReset()
  vi.mocked(getMyEstimate).mockReset()
})

afterEach(() => {
  unmountPortal()
  vi.unstubAllGlobals()
})

describe('opening the link from the e-mail', () => {
  it('takes the token out of the address at once, signs the customer in with it and shows the estimate', async () => {
    vi.mocked(openEstimateLink).mockResolvedValue({ estimateId: portalIds.estimate, version: 1, user: customerPrincipal })
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate())
    const { router } = await mountPortalAt(`/portal/open?token=${token}`)

    await vi.waitFor(() => expect(router.currentRoute.value.name).toBe('portal-estimate'))
    await flushPromises()

    expect(openEstimateLink).toHaveBeenCalledWith(token)
    expect(router.currentRoute.value.params.id).toBe(portalIds.estimate)
    expect(useAuthStore().customer?.id).toBe(customerPrincipal.id)
    expect(headingText(1)).toEqual(['Your estimate for HM15 KNX'])
  })

  it('leaves no token in the address while the link is being checked', async () => {
    vi.mocked(openEstimateLink).mockReturnValue(new Promise(() => undefined))
    const { router } = await mountPortalAt(`/portal/open?token=${token}`)

    expect(router.currentRoute.value.fullPath).toBe('/portal/open')
    expect(router.currentRoute.value.name).toBe('portal-open')
    expect(headingText(1)).toEqual(['Opening your estimate…'])
  })

  it('explains a replaced estimate in plain words and e-mails a fresh link with the token it kept', async () => {
    vi.mocked(openEstimateLink).mockRejectedValue(
      new ApiError(410, 'link_superseded', 'The workshop has sent a newer version of this estimate, so this link no longer opens it.', [], {
        newerVersion: true,
        renewable: true,
      }),
    )
    vi.mocked(renewEstimateLink).mockResolvedValue({ message: renewAnswer })
    const { router } = await mountPortalAt(`/portal/open?token=${token}`)

    expect(router.currentRoute.value.fullPath).toBe('/portal/open')
    expect(headingText(1)).toEqual(['This estimate has been updated'])
    expect(text(document.querySelector('main')!)).toContain('This estimate has been updated since this e-mail was sent')

    buttonByName('E-mail me a fresh link').click()
    await flushPromises()

    expect(renewEstimateLink).toHaveBeenCalledWith(token)
    expect(statusMessages()).toContain(renewAnswer)
    expect(queryButtonByName('E-mail me a fresh link')).toBeNull()
  })

  it('offers a fresh link for an expired link, and shows a refusal to send one in its own words', async () => {
    vi.mocked(openEstimateLink).mockRejectedValue(
      new ApiError(410, 'link_expired', 'This link worked until the end of 2026-03-31.', [], { newerVersion: false, renewable: true }),
    )
    vi.mocked(renewEstimateLink).mockRejectedValue(
      new ApiError(429, 'too_many_requests', 'Too many attempts. Please wait a few minutes and try again.'),
    )
    await mountPortalAt(`/portal/open?token=${token}`)

    expect(headingText(1)).toEqual(['This link has expired'])
    buttonByName('E-mail me a fresh link').click()
    await flushPromises()

    expect(alertsIn()).toEqual(['Too many attempts. Please wait a few minutes and try again.'])
    expect(buttonByName('E-mail me a fresh link')).toBeTruthy()
  })

  it('offers no fresh link when the estimate can no longer be decided on', async () => {
    vi.mocked(openEstimateLink).mockRejectedValue(
      new ApiError(410, 'link_revoked', 'The workshop has withdrawn this estimate.', [], { newerVersion: false, renewable: false }),
    )
    await mountPortalAt(`/portal/open?token=${token}`)

    expect(headingText(1)).toEqual(['This link no longer works'])
    expect(queryButtonByName('E-mail me a fresh link')).toBeNull()
  })

  it('says a link that is not ours is incomplete, without the raw error', async () => {
    vi.mocked(openEstimateLink).mockRejectedValue(new ApiError(400, 'link_invalid', 'We do not recognise this link.'))
    await mountPortalAt(`/portal/open?token=${token}`)

    expect(headingText(1)).toEqual(['This link is not complete'])
    const main = text(document.querySelector('main')!)
    expect(main).toContain('This link is not complete — copy the whole link from the e-mail, or ask the workshop to send it again')
    expect(main).not.toContain('We do not recognise this link.')
    expect(queryButtonByName('E-mail me a fresh link')).toBeNull()
  })

  it('says the same when the address has no token at all, without asking the server', async () => {
    await mountPortalAt('/portal/open')

    expect(openEstimateLink).not.toHaveBeenCalled()
    expect(headingText(1)).toEqual(['This link is not complete'])
  })

  it('offers to try again when the server cannot be reached', async () => {
    vi.mocked(openEstimateLink)
      .mockRejectedValueOnce(new ApiError(0, 'network_error', 'The server cannot be reached. Check the connection and try again.'))
      .mockResolvedValueOnce({ estimateId: portalIds.estimate, version: 1, user: customerPrincipal })
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate())
    const { router } = await mountPortalAt(`/portal/open?token=${token}`)

    expect(headingText(1)).toEqual(["We couldn't open your estimate"])
    buttonByName('Try again').click()
    await vi.waitFor(() => expect(router.currentRoute.value.name).toBe('portal-estimate'))

    expect(vi.mocked(openEstimateLink).mock.calls).toEqual([[token], [token]])
  })
})
