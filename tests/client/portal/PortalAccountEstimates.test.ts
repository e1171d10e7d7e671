// @vitest-environment happy-dom
import { afterEach, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest'
import { getMe } from '@/api/auth'
import { ApiError } from '@/api/http'
import { listMyEstimates, listMyVehicles } from '@/api/portal-account'
import type * as PortalAccountApi from '@/api/portal-account'
import type { PortalEstimateSummary } from '@shared/schemas/portal'
import { buttonByName } from '../support/dom'
import { customerPrincipal } from '../support/principals'
import { preloadRouteComponents } from '../support/router'
import { portalIds } from './fixtures'
import { mountPortalAt, regionNamed, text, unmountPortal } from './harness'

vi.mock('@/api/auth', () => ({ getMe: vi.fn(), requestSignInLink: vi.fn(), verifySignInLink: vi.fn(), signOut: vi.fn() }))
vi.mock('@/api/portal-account', async (importOriginal) => ({
  ...(await importOriginal<typeof PortalAccountApi>()),
  listMyVehicles: vi.fn(),
  listMyEstimates: vi.fn(),
}))

function summary(overrides: Partial<PortalEstimateSummary> = {}): PortalEstimateSummary {
  return {
    id: portalIds.estimate,
    reference: 'E-0042',
    workshopName: 'Hollowmere 4x4',
    vehicle: { registration: 'HM15 KNX', make: 'Brackwater', model: 'Ridgeline 110' },
    latestVersion: 1,
    status: 'opened',
    sentAt: '2026-03-02T09:30:00.000Z',
    expiresOn: '2026-03-31',
    currency: 'GBP',
    proposedGross: 49200,
    approvedGross: null,
    ...overrides,
  }
}

beforeAll(() => preloadRouteComponents())

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
  vi.mocked(getMe).mockResolvedValue(customerPrincipal)
  vi.mocked(listMyVehicles).mockResolvedValue([])
  vi.mocked(listMyEstimates).mockReset()
})

afterEach(() => {
  unmountPortal()
  vi.unstubAllGlobals()
})

describe('your estimates, on the account page', () => {
  it('lists each estimate with where it stands, its figure and a link to it', async () => {
    vi.mocked(listMyEstimates).mockResolvedValue([
      summary(),
      summary({
        id: '94a6e34b-a5c7-48f9-83a4-b5f607189200',
        reference: 'E-0031',
        status: 'deposit_paid',
        approvedGross: 30000,
        vehicle: { registration: 'HM05 OLD', make: 'Fenwick', model: 'Moorland' },
      }),
    ])
    await mountPortalAt('/portal/account')

    const list = document.querySelector('[role="list"][aria-label="Your estimates"]')!
    const rows = [...list.querySelectorAll('li')].map(text)
    expect(rows[0]).toContain('Waiting for your decision')
    expect(rows[0]).toContain('Every item £492.00 incl. VAT · decide by Tuesday 31 March 2026')
    expect(rows[1]).toContain('You confirmed it — deposit paid')
    expect(rows[1]).toContain('Approved £300.00 incl. VAT')
    expect(rows[1]).not.toContain('decide by')
    expect(buttonByName('HM15 KNX — estimate E-0042').getAttribute('href')).toBe(`/portal/estimates/${portalIds.estimate}`)
  })

  it('says where estimates will appear when there are none', async () => {
    vi.mocked(listMyEstimates).mockResolvedValue([])
    await mountPortalAt('/portal/account')

    expect(text(regionNamed('Your estimates', 'section'))).toContain('When your workshop sends you an estimate, it will appear here')
  })

  it('offers to try again when the list did not load', async () => {
    vi.mocked(listMyEstimates)
      .mockRejectedValueOnce(new ApiError(503, 'network_error', 'The server cannot be reached right now (HTTP 503).'))
      .mockResolvedValue([summary()])
    await mountPortalAt('/portal/account')

    expect(text(regionNamed('Your estimates', 'section'))).toContain('The server cannot be reached right now (HTTP 503).')
    buttonByName('Try again', regionNamed('Your estimates', 'section')).click()
    await vi.waitFor(() => expect(document.querySelector('[aria-label="Your estimates"][role="list"]')).not.toBeNull())
  })
})
