// @vitest-environment happy-dom
import { flushPromises } from '@vue/test-utils'
import { afterEach, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest'
import { getMe } from '@/api/auth'
import { ApiError } from '@/api/http'
import { getDeposit } from '@/api/portal'
import type * as PortalApi from '@/api/portal'
import { DEPOSIT_POLL_EVERY_MS, DEPOSIT_POLL_FOR_MS } from '@/stores/portal-estimate'
import { buttonByName, queryButtonByName, statusMessages } from '../support/dom'
import { customerPrincipal } from '../support/principals'
import { preloadRouteComponents } from '../support/router'
import { deposit, portalIds } from './fixtures'
import { mountPortalAt, unmountPortal } from './harness'

vi.mock('@/api/auth', () => ({ getMe: vi.fn(), requestSignInLink: vi.fn(), verifySignInLink: vi.fn(), signOut: vi.fn() }))
vi.mock('@/api/portal', async (importOriginal) => ({
  ...(await importOriginal<typeof PortalApi>()),
  getDeposit: vi.fn(),
  getMyEstimate: vi.fn(),
}))

const paidPath = `/portal/estimates/${portalIds.estimate}/paid?session_id=cs_test_1`
const waiting = deposit({ status: 'awaiting_payment', amountMinor: 6000 })

async function tick(ms: number): Promise<void> {
  await vi.advanceTimersByTimeAsync(ms)
  await flushPromises()
}

beforeAll(() => preloadRouteComponents())

beforeEach(() => {
  sessionStorage.clear()
  vi.stubGlobal('visualViewport', undefined)
  vi.mocked(getMe).mockResolvedValue(customerPrincipal)
  vi.mocked(getDeposit).mockReset()
  // Only the clock the page polls by; promises and Vue's scheduler run as usual.
  vi.useFakeTimers({ toFake: ['setTimeout', 'clearTimeout', 'Date'] })
})

afterEach(() => {
  unmountPortal()
  vi.useRealTimers()
  vi.unstubAllGlobals()
})

describe('coming back from paying', () => {
  it('says the payment is being confirmed and asks every 1.5 s until the server has heard it is paid', async () => {
    vi.mocked(getDeposit)
      .mockResolvedValueOnce(waiting)
      .mockResolvedValueOnce(waiting)
      .mockResolvedValue(deposit({ status: 'paid', amountMinor: 6000, paidAt: '2026-03-03T14:07:00.000Z' }))
    await mountPortalAt(paidPath)

    expect(getDeposit).toHaveBeenCalledTimes(1)
    expect(statusMessages()).toEqual(['Payment being confirmed…'])

    await tick(DEPOSIT_POLL_EVERY_MS - 1)
    expect(getDeposit).toHaveBeenCalledTimes(1)
    await tick(1)
    expect(getDeposit).toHaveBeenCalledTimes(2)
    expect(statusMessages()).toEqual(['Payment being confirmed…'])

    await tick(DEPOSIT_POLL_EVERY_MS)
    expect(getDeposit).toHaveBeenCalledTimes(3)
    expect(getDeposit).toHaveBeenCalledWith(portalIds.estimate)
    expect(statusMessages()).toEqual(['Deposit paid — £60.00, receipt sent to your e-mail.'])
    expect(buttonByName('Download the PDF').getAttribute('href')).toBe(`/api/portal/estimates/${portalIds.estimate}/pdf`)

    await tick(DEPOSIT_POLL_EVERY_MS * 4)
    expect(getDeposit).toHaveBeenCalledTimes(3)
  })

  it('forgets that this tab went to pay, so the estimate page will not say the payment failed', async () => {
    sessionStorage.setItem('tickover.portal.checkout', portalIds.estimate)
    vi.mocked(getDeposit).mockResolvedValue(waiting)
    await mountPortalAt(paidPath)

    expect(sessionStorage.getItem('tickover.portal.checkout')).toBeNull()
  })

  it('keeps asking through a dropped connection', async () => {
    vi.mocked(getDeposit)
      .mockRejectedValueOnce(new ApiError(0, 'network_error', 'The server cannot be reached.'))
      .mockResolvedValue(deposit({ status: 'paid', amountMinor: 6000, paidAt: '2026-03-03T14:07:00.000Z' }))
    await mountPortalAt(paidPath)

    expect(statusMessages()).toEqual(['Payment being confirmed…'])
    await tick(DEPOSIT_POLL_EVERY_MS)
    expect(statusMessages()).toEqual(['Deposit paid — £60.00, receipt sent to your e-mail.'])
  })

  it('says calmly that the card company is slow after a minute, stops asking, and can ask again', async () => {
    vi.mocked(getDeposit).mockResolvedValue(waiting)
    await mountPortalAt(paidPath)

    await tick(DEPOSIT_POLL_FOR_MS + DEPOSIT_POLL_EVERY_MS)
    const asked = vi.mocked(getDeposit).mock.calls.length
    expect(asked).toBeGreaterThanOrEqual(DEPOSIT_POLL_FOR_MS / DEPOSIT_POLL_EVERY_MS)
    expect(statusMessages()).toEqual(["Still waiting for the card company — we'll e-mail your receipt as soon as it is through."])
    expect(queryButtonByName('Download the PDF')).toBeNull()

    await tick(DEPOSIT_POLL_EVERY_MS * 10)
    expect(getDeposit).toHaveBeenCalledTimes(asked)

    buttonByName('Check again').click()
    await flushPromises()
    expect(getDeposit).toHaveBeenCalledTimes(asked + 1)
    expect(statusMessages()).toEqual(['Payment being confirmed…'])
  })
})
