// @vitest-environment happy-dom
import { flushPromises } from '@vue/test-utils'
import { afterEach, beforeAll, beforeEach, describe, expect, it, vi } from 'vitest'
import { getMe } from '@/api/auth'
import { ApiError } from '@/api/http'
import { askQuestion, getMyEstimate, putDecision } from '@/api/portal'
import type * as PortalApi from '@/api/portal'
import { formatMoney } from '@shared/money'
import type { DecisionResponse } from '@shared/schemas/portal'
import { alertsIn, buttonByName, fieldByLabel, headingText, openDialog, queryButtonByName, typeInto } from '../support/dom'
import { customerPrincipal } from '../support/principals'
import { deferred } from '../support/records'
import { preloadRouteComponents } from '../support/router'
import { deposit, pendingDecisions, portalEstimate, portalIds, priced, snapshot } from './fixtures'
import { mountPortalAt, regionNamed, summaryFigure, text, unmountPortal } from './harness'

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

const estimatePath = `/portal/estimates/${portalIds.estimate}`
const money = (minor: number) => formatMoney(minor, 'GBP')

function item(title: string): HTMLElement {
  return regionNamed(title, 'article')
}

function decisionButton(card: HTMLElement, name: RegExp): HTMLElement {
  return buttonByName(name, card.querySelector('[role="group"]')!)
}

/** A thumbnail is named by its picture's description. */
function photoButton(alt: string): HTMLElement {
  const button = document.querySelector(`img[alt="${alt}"]`)?.closest('button')
  if (!button) throw new Error(`No photo button showing ${alt}`)
  return button
}

function answer(decisions: Record<string, 'approved' | 'declined' | 'pending'>): DecisionResponse {
  return { version: 1, decisions, result: priced(snapshot(), decisions) }
}

beforeAll(() => preloadRouteComponents())

beforeEach(() => {
  vi.stubGlobal('visualViewport', undefined)
  vi.mocked(getMe).mockResolvedValue(customerPrincipal)
  vi.mocked(getMyEstimate).mockReset()
  vi.mocked(putDecision).mockReset()
  vi.mocked(askQuestion).mockReset()
  sessionStorage.clear()
})

afterEach(() => {
  unmountPortal()
  vi.unstubAllGlobals()
})

describe('the estimate page', () => {
  it('shows the workshop, the vehicle, the reference and version, the date to decide by and the message', async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate())
    await mountPortalAt(estimatePath)

    expect(getMyEstimate).toHaveBeenCalledWith(portalIds.estimate, undefined)
    expect(headingText(1)).toEqual(['Your estimate for HM15 KNX'])
    const main = text(document.querySelector('main')!)
    expect(main).toContain('Brackwater Ridgeline 110')
    expect(main).toContain('Estimate E-0042, version 1')
    expect(main).toContain('Decide by Tuesday 31 March 2026')
    expect(main).toContain('Here is what we found on the ramp.')
    // What everything would cost, before the customer picks: the engine's proposed total.
    const all = priced(snapshot(), { ...pendingDecisions })
    expect(main).toContain(`All ${snapshot().items.length} items together come to ${money(all.proposed.gross)} incl. VAT`)
    expect(buttonByName('Call 01632 960 555').getAttribute('href')).toBe('tel:01632960555')
    expect(buttonByName('E-mail desk@hollowmere.test').getAttribute('href')).toBe('mailto:desk@hollowmere.test')
  })

  it('groups the items by severity, most serious first, each heading with word, icon and colour', async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate())
    await mountPortalAt(estimatePath)

    expect(headingText(2).filter((h) => h.includes(':'))).toEqual([
      'Fix now — safety: 1 item',
      'Fix soon: 1 item',
      'Keep an eye on: 1 item',
    ])
    const urgent = regionNamed('Fix now — safety: 1 item', 'section')
    expect(urgent.querySelector('h2 .bg-urgent svg')).not.toBeNull()
    expect([...urgent.querySelectorAll('h3')].map(text)).toEqual(['2. Front CV joint'])
    expect([...regionNamed('Fix soon: 1 item', 'section').querySelectorAll('h3')].map(text)).toEqual(['1. Front hub seal'])
    expect(text(item('1. Front hub seal'))).toContain('Fix soon')
  })

  it("shows each item's note, explanation, measurement, tax-inclusive price, needs and photos", async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate())
    await mountPortalAt(estimatePath)

    const hub = text(item('1. Front hub seal'))
    expect(hub).toContain('The seal is weeping oil onto the brake disc.')
    const explanation = [...item('1. Front hub seal').querySelectorAll('dt, dd')].map(text)
    expect(explanation).toEqual([
      'What we found',
      'Oil behind the hub.',
      'Why it matters',
      'Oil on the disc weakens the brakes.',
      "If it's left",
      'The bearing runs dry and fails.',
    ])
    const expected = priced(snapshot(), pendingDecisions).items.find((i) => i.id === 'item-hub')!.gross
    expect(hub).toContain(`${money(expected)} incl. VAT`)
    expect(text(item('2. Front CV joint'))).toContain('Measured: Play 1.2 mm')
    expect(text(item('3. CV boot clips'))).toContain('Needs item 2 (Front CV joint) — approve that too.')

    const thumbs = [...item('1. Front hub seal').querySelectorAll('img')]
    expect(thumbs.map((i) => i.getAttribute('src'))).toEqual([
      `/api/portal/estimates/${portalIds.estimate}/photos/${portalIds.photoA}/thumb`,
      `/api/portal/estimates/${portalIds.estimate}/photos/${portalIds.photoB}/thumb`,
    ])
  })

  it('opens a photo full size in a dialog with its description and a close button', async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate())
    await mountPortalAt(estimatePath)

    photoButton('Photo 2 of 2, Front hub seal — show it full size').click()
    // The dialog's code loads on first use.
    const dialog = await vi.waitFor(() => openDialog() ?? Promise.reject(new Error('no dialog yet')))
    const full = dialog.querySelector('img')!
    expect(full.getAttribute('src')).toBe(`/api/portal/estimates/${portalIds.estimate}/photos/${portalIds.photoB}`)
    expect(full.getAttribute('alt')).toBe('Photo 2 of 2, Front hub seal')
    buttonByName('Close', dialog).click()
    await flushPromises()
    expect(openDialog()).toBeNull()
  })

  it("moves the total and deposit to the engine's figures the moment an item is approved, then to the server's", async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate())
    const saving = deferred<DecisionResponse>()
    vi.mocked(putDecision).mockReturnValue(saving.promise)
    await mountPortalAt(estimatePath)
    expect(summaryFigure('Approved total')).toBe(money(0))

    const card = item('2. Front CV joint')
    decisionButton(card, /^Approve item 2$/).click()
    await flushPromises()

    const chosen = { ...pendingDecisions, 'item-cv': 'approved' } as const
    const engine = priced(snapshot(), chosen).approved
    expect(engine.gross).toBeGreaterThan(0)
    expect(summaryFigure('Approved total')).toBe(money(engine.gross))
    expect(summaryFigure('Deposit')).toBe(money(engine.deposit))
    expect(text(card)).toContain('Saving your choice…')
    const approved = decisionButton(card, /^Approved item 2$/)
    expect(approved.getAttribute('aria-pressed')).toBe('true')
    expect(approved.querySelector('svg')).not.toBeNull()
    expect(putDecision).toHaveBeenCalledWith(portalIds.estimate, 'item-cv', { version: 1, decision: 'approved' })

    // The server is the truth: here it has the first item approved as well (chosen in another tab).
    const serverDecisions = { ...chosen, 'item-hub': 'approved' } as const
    saving.resolve(answer(serverDecisions))
    await flushPromises()

    const server = priced(snapshot(), serverDecisions).approved
    expect(server.gross).not.toBe(engine.gross)
    expect(summaryFigure('Approved total')).toBe(money(server.gross))
    expect(summaryFigure('Deposit')).toBe(money(server.deposit))
    expect(text(card)).not.toContain('Saving your choice…')
    expect(document.querySelector('[aria-live="polite"]')?.textContent).toBe(
      `Approved total now ${money(server.gross)}, deposit ${money(server.deposit)}.`,
    )
  })

  it('shows the shared-access saving on the later item once both are approved', async () => {
    const decisions = { ...pendingDecisions, 'item-hub': 'approved', 'item-cv': 'approved' } as const
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate({ decisions }))
    await mountPortalAt(estimatePath)

    const line = priced(snapshot(), decisions).items.find((i) => i.id === 'item-cv')!.lines[0]!
    expect(line.sharedSaving).toBeGreaterThan(0)
    // 0.8 h at £80.00 plus 20% VAT, by hand: £64.00 + £12.80.
    expect(text(item('2. Front CV joint'))).toContain('Hub off already done for item 1 (Front hub seal) — saves £76.80')
  })

  it("shows the server's words beside an item it refuses and puts the choice back", async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate())
    const words =
      'Item 3 (CV boot clips) can only be done together with item 2 (Front CV joint). Approve that item first, or decline this one.'
    vi.mocked(putDecision).mockRejectedValue(
      new ApiError(422, 'requires', words, [{ path: ['decisions', 'item-cv'], message: 'needs item 2' }]),
    )
    await mountPortalAt(estimatePath)

    const card = item('3. CV boot clips')
    decisionButton(card, /^Approve item 3$/).click()
    await flushPromises()

    expect(alertsIn(card)).toEqual([words])
    expect(decisionButton(card, /^Approve item 3$/).getAttribute('aria-pressed')).toBe('false')
    expect(summaryFigure('Approved total')).toBe(money(0))
  })

  it('says the workshop has updated the estimate when a choice meets a newer version, and goes to it', async () => {
    vi.mocked(getMyEstimate).mockResolvedValueOnce(portalEstimate())
    vi.mocked(putDecision).mockRejectedValue(
      new ApiError(409, 'superseded', 'The workshop has sent a newer version (version 2).', [], { latestVersion: 2 }),
    )
    await mountPortalAt(estimatePath)

    decisionButton(item('1. Front hub seal'), /^Approve item 1$/).click()
    await flushPromises()

    expect(alertsIn().join(' ')).toContain('The workshop has updated this estimate')
    expect(queryButtonByName(/^Approve item 1$/)).toBeNull()

    const newer = snapshot({ version: 2 })
    vi.mocked(getMyEstimate).mockResolvedValueOnce(portalEstimate({ snapshot: newer, version: 2, latestVersion: 2 }))
    buttonByName('See the new version').click()
    await flushPromises()

    expect(getMyEstimate).toHaveBeenLastCalledWith(portalIds.estimate, undefined)
    expect(text(document.querySelector('main')!)).toContain('Estimate E-0042, version 2')
    expect(queryButtonByName('See the new version')).toBeNull()
  })

  it('keeps "Review and confirm" disabled, saying why, until every item is decided', async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate({ decisions: { ...pendingDecisions, 'item-hub': 'approved' } }))
    vi.mocked(putDecision).mockImplementation(async (_id, itemId, body) =>
      answer({ 'item-hub': 'approved', 'item-cv': 'declined', 'item-boot': 'pending', [itemId]: body.decision }),
    )
    const { router } = await mountPortalAt(estimatePath)

    const review = buttonByName('Review and confirm')
    expect(review.hasAttribute('disabled')).toBe(true)
    expect(document.getElementById(review.getAttribute('aria-describedby')!)?.textContent).toBe(
      'Approve or decline the 2 items still open first.',
    )

    decisionButton(item('2. Front CV joint'), /^Decline item 2$/).click()
    await flushPromises()
    decisionButton(item('3. CV boot clips'), /^Decline item 3$/).click()
    await flushPromises()

    expect(buttonByName('Review and confirm').hasAttribute('disabled')).toBe(false)
    expect(decisionButton(item('3. CV boot clips'), /^Declined item 3$/).getAttribute('aria-pressed')).toBe('true')
    buttonByName('Review and confirm').click()
    await flushPromises()
    await vi.waitFor(() => expect(router.currentRoute.value.name).toBe('portal-confirm'))
  })

  it('asks a question about an item and shows it under the item', async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate())
    vi.mocked(askQuestion).mockImplementation(async (_id, body) => ({
      id: portalIds.question,
      itemId: body.itemId,
      version: 1,
      question: body.question,
      answer: null,
      askedAt: '2026-03-02T10:00:00.000Z',
      answeredAt: null,
    }))
    await mountPortalAt(estimatePath)

    buttonByName('Ask a question about item 2').click()
    await vi.waitFor(() => openDialog() ?? Promise.reject(new Error('no dialog yet')))
    buttonByName('Send question', openDialog()!).click()
    await flushPromises()
    expect(askQuestion).not.toHaveBeenCalled()
    expect(text(openDialog()!)).toContain('Type your question')

    typeInto(fieldByLabel('Your question'), '  Can it wait until May?  ')
    await flushPromises()
    buttonByName('Send question', openDialog()!).click()
    await flushPromises()

    expect(askQuestion).toHaveBeenCalledWith(portalIds.estimate, { itemId: 'item-cv', question: 'Can it wait until May?' })
    expect(openDialog()).toBeNull()
    const questions = text(regionNamed('Your questions about item 2', 'section'))
    expect(questions).toContain('Can it wait until May?')
    expect(questions).toContain('Waiting for Hollowmere 4x4 to answer')
  })
})

describe('the estimate page, read-only', () => {
  it('says when the decision date has passed and offers no choices', async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate({ expired: true, canDecide: false, status: 'expired' }))
    await mountPortalAt(estimatePath)

    expect(text(document.querySelector('main')!)).toContain('The decision date has passed')
    expect(text(document.querySelector('main')!)).toContain('Ask the workshop for a fresh estimate')
    expect(queryButtonByName(/^Approve/)).toBeNull()
    expect(queryButtonByName('Review and confirm')).toBeNull()
  })

  it('says when the workshop has withdrawn the estimate', async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate({ withdrawn: true, canDecide: false, status: 'withdrawn' }))
    await mountPortalAt(estimatePath)

    expect(text(document.querySelector('main')!)).toContain('The workshop has withdrawn this estimate')
    expect(queryButtonByName(/^Approve/)).toBeNull()
  })

  it('shows an earlier version as replaced, with a way to the latest', async () => {
    vi.mocked(getMyEstimate).mockResolvedValue(portalEstimate({ superseded: true, canDecide: false, latestVersion: 2 }))
    const { router } = await mountPortalAt(`${estimatePath}?version=1`)

    expect(getMyEstimate).toHaveBeenCalledWith(portalIds.estimate, 1)
    expect(text(document.querySelector('main')!)).toContain('You are looking at version 1.')
    buttonByName('See the new version').click()
    await vi.waitFor(() => expect(router.currentRoute.value.query.version).toBeUndefined())
    await flushPromises()
    expect(getMyEstimate).toHaveBeenLastCalledWith(portalIds.estimate, undefined)
  })

  it('shows a confirmed estimate with the decisions, when they were recorded and the deposit paid', async () => {
    const decisions = { 'item-hub': 'approved', 'item-cv': 'approved', 'item-boot': 'declined' } as const
    const figures = priced(snapshot(), decisions).approved
    vi.mocked(getMyEstimate).mockResolvedValue(
      portalEstimate({
        decisions,
        canDecide: false,
        status: 'deposit_paid',
        confirmation: {
          id: '1c2e6bcd-2d4f-4a78-8b1c-3d7e8f96ba88',
          confirmedAt: '2026-03-03T14:05:00.000Z',
          versionHash: 'a'.repeat(64),
          decisions: { 'item-hub': 'approved', 'item-cv': 'approved', 'item-boot': 'declined' },
          consents: { startWithinCancellationPeriod: false, cancellationInformationShown: true },
          approvedGross: figures.gross,
          depositMinor: figures.deposit,
        },
        deposit: deposit({ status: 'paid', amountMinor: figures.deposit, paidAt: '2026-03-03T14:07:00.000Z' }),
      }),
    )
    await mountPortalAt(estimatePath)

    const main = text(document.querySelector('main')!)
    // 14:05 UTC is 14:05 in London in early March (GMT).
    expect(main).toContain('You confirmed your decisions on 3 Mar 2026, 14:05.')
    expect(main).toContain(`Approved total ${money(figures.gross)} incl. VAT, deposit ${money(figures.deposit)}.`)
    expect(main).toContain(`Deposit paid — ${money(figures.deposit)} on 3 Mar 2026, 14:07.`)
    expect(text(item('3. CV boot clips'))).toContain('Your choice: Declined')
    expect(buttonByName('Download the PDF').getAttribute('href')).toBe(`/api/portal/estimates/${portalIds.estimate}/pdf`)
  })

  it('says the payment did not go through when the customer comes back from paying without paying', async () => {
    const decisions = { 'item-hub': 'approved', 'item-cv': 'declined', 'item-boot': 'declined' } as const
    const figures = priced(snapshot(), decisions).approved
    vi.mocked(getMyEstimate).mockResolvedValue(
      portalEstimate({
        decisions,
        canDecide: false,
        status: 'confirmed',
        confirmation: {
          id: '1c2e6bcd-2d4f-4a78-8b1c-3d7e8f96ba88',
          confirmedAt: '2026-03-03T14:05:00.000Z',
          versionHash: 'a'.repeat(64),
          decisions: { ...decisions },
          consents: { startWithinCancellationPeriod: true, cancellationInformationShown: true },
          approvedGross: figures.gross,
          depositMinor: figures.deposit,
        },
        deposit: deposit({ status: 'awaiting_payment', amountMinor: figures.deposit }),
      }),
    )
    sessionStorage.setItem('tickover.portal.checkout', portalIds.estimate)
    await mountPortalAt(estimatePath)

    expect(alertsIn()).toContain('The payment did not go through — no money was taken. You can try again.')
    expect(buttonByName(`Pay deposit ${money(figures.deposit)}`)).toBeTruthy()
  })
})
