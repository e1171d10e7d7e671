// @vitest-environment happy-dom
import { flushPromises } from '@vue/test-utils'
import { afterEach, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest'
import { getMe } from '@/api/auth'
import { ApiError } from '@/api/http'
import { confirmEstimate, getMyEstimate, startDepositCheckout } from '@/api/portal'
import type * as PortalApi from '@/api/portal'
import { formatMoney } from '@shared/money'
import type { Decision } from '@shared/estimate/contract'
import type { PortalEstimate } from '@shared/schemas/portal'
import { alertsIn, buttonByName, fieldByLabel, headingText, queryButtonByName } from '../support/dom'
import { customerPrincipal } from '../support/principals'
import { preloadRouteComponents } from '../support/router'
import { deposit, portalEstimate, portalIds, priced, snapshot } from './fixtures'
import { mountPortalAt, regionNamed, text, unmountPortal } from './harness'

vi.mock('@/api/auth', () => ({ getMe: vi.fn(), requestSignInLink: vi.fn(), verifySignInLink: vi.fn(), signOut: vi.fn() }))
vi.mock('@/api/portal', async (importOriginal) => ({
  ...(await importOriginal<typeof PortalApi>()),
  getMyEstimate: vi.fn(),
  putDecision: vi.fn(),
  askQuestion: vi.fn(),
  confirmEstimate: vi.fn(),
  getDeposit: vi.fn(),
  startDepositCheckout: vi.fn(),
}))

const confirmPath = `/portal/estimates/${portalIds.estimate}/confirm`
const money = (minor: number) => formatMoney(minor, 'GBP')
const someApproved = { 'item-hub': 'approved', 'item-cv': 'approved', 'item-boot': 'declined' } as const satisfies Record<string, Decision>
const allDeclined = { 'item-hub': 'declined', 'item-cv': 'declined', 'item-boot': 'declined' } as const satisfies Record<string, Decision>
const consentWords = 'Please start the work within the 14 days. I understand I will pay for work done if I then cancel.'

/** What the server answers once the estimate is confirmed with these decisions. */
function confirmedEstimate(decisions: Record<string, Decision>, startWithin: boolean): PortalEstimate {
  const figures = priced(snapshot(), decisions).approved
  return portalEstimate({
    decisions,
    canDecide: false,
    status: 'confirmed',
    confirmation: {
      id: '1c2e6bcd-2d4f-4a78-8b1c-3d7e8f96ba88',
      confirmedAt: '2026-03-03T14:05:00.000Z',
      versionHash: 'a'.repeat(64),
      decisions: Object.fromEntries(Object.entries(decisions).map(([k, v]) => [k, v === 'approved' ? 'approved' : 'declined'])),
      consents: { startWithinCancellationPeriod: startWithin, cancellationInformationShown: true },
      approvedGross: figures.gross,
      depositMinor: figures.deposit,
    },
    deposit: figures.deposit > 0 ? deposit({ status: 'awaiting_payment', amountMinor: figures.deposit }) : deposit(),
  })
}

beforeAll(() => preloadRouteComponents())

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
  vi.mocked(getMe).mockResolvedValue(customerPrincipal)
  vi.mocked(getMyEstimate).mockReset()
  vi.mocked(confirmEstimate).mockReset()
  vi.mocked(startDepositCheckout).mockReset()
  sessionStorage.clear()
})

afterEach(() => {
  unmountPortal()
  vi.unstubAllGlobals()
  vi.restoreAllMocks()
})

describe('review and confirm', () => {
  it('lists the decisions with tax-inclusive prices, the total, VAT and deposit, and who the trader is', async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate({ decisions: someApproved }))
    await mountPortalAt(confirmPath)

    const figures = priced(snapshot(), someApproved)
    const summary = regionNamed('Your decisions', 'section')
    const approvedRows = [...summary.querySelectorAll('ul')[0]!.querySelectorAll('li')].map(text)
    const gross = (id: string) => money(figures.items.find((i) => i.id === id)!.gross)
    expect(approvedRows).toEqual([`1. Front hub seal${gross('item-hub')} incl. VAT`, `2. Front CV joint${gross('item-cv')} incl. VAT`])
    expect([...summary.querySelectorAll('ul')[1]!.querySelectorAll('li')].map(text)).toEqual(['3. CV boot clips'])
    const totals = [...summary.querySelectorAll('dl div')].map(text)
    expect(totals).toEqual([
      `Total to pay${money(figures.approved.gross)}`,
      `Of which VAT${money(figures.approved.tax)}`,
      `Deposit due now${money(figures.approved.deposit)}`,
    ])
    const trader = text(regionNamed('Who you are agreeing with', 'section'))
    expect(trader).toContain('Hollowmere 4x4 Ltd')
    expect(trader).toContain('Unit 4, Tarn Yard')
    expect(trader).toContain('HM1 2TY')
    const cancel = text(regionNamed('Your right to cancel', 'section'))
    expect(cancel).toContain('You have 14 days to cancel.')
    expect(cancel).toContain('General guidance, not legal advice.')
    expect(buttonByName('Cancellation form')).toBeTruthy()
  })

  it('has a separate consent box that starts unticked, and sends what the customer chose with the version and hash', async () => {
    vi.mocked(getMyEstimate).mockResolvedValueOnce(portalEstimate({ decisions: someApproved }))
    const figures = priced(snapshot(), someApproved).approved
    vi.mocked(confirmEstimate).mockResolvedValue({
      confirmationId: '1c2e6bcd-2d4f-4a78-8b1c-3d7e8f96ba88',
      depositDue: figures.deposit,
      next: 'pay',
    })
    vi.mocked(getMyEstimate).mockResolvedValueOnce(confirmedEstimate(someApproved, true))
    await mountPortalAt(confirmPath)

    const consent = fieldByLabel(consentWords) as HTMLInputElement
    expect(consent.type).toBe('checkbox')
    expect(consent.checked).toBe(false)
    consent.click()
    await flushPromises()
    expect(consent.checked).toBe(true)

    buttonByName(`Confirm and agree to pay ${money(figures.gross)}`).click()
    await flushPromises()

    expect(confirmEstimate).toHaveBeenCalledWith(portalIds.estimate, {
      version: 1,
      hash: 'a'.repeat(64),
      consents: { startWithinCancellationPeriod: true, cancellationInformationShown: true },
    })
    expect(headingText(1)).toEqual(['Thank you'])
    expect(document.activeElement?.textContent).toBe('Thank you')
    expect(buttonByName(`Pay deposit ${money(figures.deposit)}`)).toBeTruthy()
  })

  it('sends an unticked box as it is', async () => {
    vi.mocked(getMyEstimate).mockResolvedValueOnce(portalEstimate({ decisions: someApproved }))
    vi.mocked(confirmEstimate).mockResolvedValue({ confirmationId: '1c2e6bcd-2d4f-4a78-8b1c-3d7e8f96ba88', depositDue: 0, next: 'pay' })
    vi.mocked(getMyEstimate).mockResolvedValueOnce(confirmedEstimate(someApproved, false))
    await mountPortalAt(confirmPath)

    buttonByName(/^Confirm and agree to pay £/).click()
    await flushPromises()

    expect(vi.mocked(confirmEstimate).mock.calls[0]![1].consents.startWithinCancellationPeriod).toBe(false)
  })

  it('goes by the confirm answer when the estimate cannot be fetched again afterwards', async () => {
    vi.mocked(getMyEstimate).mockResolvedValueOnce(portalEstimate({ decisions: someApproved }))
    vi.mocked(confirmEstimate).mockResolvedValue({ confirmationId: '1c2e6bcd-2d4f-4a78-8b1c-3d7e8f96ba88', depositDue: 7944, next: 'pay' })
    vi.mocked(getMyEstimate).mockRejectedValueOnce(new ApiError(0, 'network_error', 'The server cannot be reached.'))
    await mountPortalAt(confirmPath)

    buttonByName(/^Confirm and agree to pay £/).click()
    await flushPromises()

    expect(headingText(1)).toEqual(['Thank you'])
    expect(buttonByName('Pay deposit £79.44')).toBeTruthy()
    expect(queryButtonByName(/^Confirm and agree/)).toBeNull()
  })

  it('pays the deposit on the provider’s page', async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(confirmedEstimate(someApproved, false))
    vi.mocked(startDepositCheckout).mockResolvedValue({ url: 'https://pay.example.test/session/cs_test_1' })
    const assign = vi.spyOn(window.location, 'assign').mockImplementation(() => undefined)
    await mountPortalAt(confirmPath)

    const figures = priced(snapshot(), someApproved).approved
    buttonByName(`Pay deposit ${money(figures.deposit)}`).click()
    await flushPromises()

    expect(startDepositCheckout).toHaveBeenCalledWith(portalIds.estimate)
    expect(assign).toHaveBeenCalledWith('https://pay.example.test/session/cs_test_1')
    expect(sessionStorage.getItem('tickover.portal.checkout')).toBe(portalIds.estimate)
  })

  it('confirms declining everything in words that say so, then offers the PDF', async () => {
    vi.mocked(getMyEstimate).mockResolvedValueOnce(portalEstimate({ decisions: allDeclined }))
    vi.mocked(confirmEstimate).mockResolvedValue({ confirmationId: '1c2e6bcd-2d4f-4a78-8b1c-3d7e8f96ba88', depositDue: 0, next: 'done' })
    vi.mocked(getMyEstimate).mockResolvedValueOnce(confirmedEstimate(allDeclined, false))
    await mountPortalAt(confirmPath)

    expect(queryButtonByName(/^Confirm and agree to pay/)).toBeNull()
    buttonByName("Confirm I don't want this work").click()
    await flushPromises()

    expect(headingText(1)).toEqual(['Thank you'])
    expect(text(document.querySelector('main')!)).toContain("You told Hollowmere 4x4 you don't want this work done.")
    expect(buttonByName('Download the PDF').getAttribute('href')).toBe(`/api/portal/estimates/${portalIds.estimate}/pdf`)
    expect(queryButtonByName(/^Pay deposit/)).toBeNull()
  })

  it('sends the customer back to decide when items are still open', async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate({ decisions: { ...someApproved, 'item-boot': 'pending' } }))
    await mountPortalAt(confirmPath)

    expect(text(document.querySelector('main')!)).toContain('Approve or decline every item first — one item is still open.')
    expect(queryButtonByName(/^Confirm/)).toBeNull()
  })

  it('shows the banner with a way to the new version when the workshop has replaced this one', async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate({ decisions: someApproved }))
    vi.mocked(confirmEstimate).mockRejectedValue(new ApiError(409, 'superseded', 'A newer version exists.', [], { latestVersion: 2 }))
    await mountPortalAt(confirmPath)

    buttonByName(/^Confirm and agree to pay £/).click()
    await flushPromises()

    expect(alertsIn().join(' ')).toContain('The workshop has updated this estimate')
    expect(buttonByName('See the new version').getAttribute('href')).toBe(`/portal/estimates/${portalIds.estimate}`)
  })

  it("shows the server's words when the confirmation is refused", async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate({ decisions: someApproved }))
    const words = 'The estimate on your screen is not the one the workshop sent. Please reload the page and check it again.'
    vi.mocked(confirmEstimate).mockRejectedValue(new ApiError(422, 'hash_mismatch', words, [{ path: ['hash'], message: 'Does not match' }]))
    await mountPortalAt(confirmPath)

    buttonByName(/^Confirm and agree to pay £/).click()
    await flushPromises()

    expect(alertsIn()).toEqual([words])
  })
})
