import type { Locator, Page } from 'playwright-core'
import { describe, expect, inject, it } from 'vitest'
import { calculateEstimate } from '../../shared/estimate'
import { formatMoney } from '../../shared/money'
import type { Decision } from '../../shared/estimate/contract'
import { type EstimateDetail, draftToEngineInput, estimateStatusLabels, snapshotToEngineInput } from '../../shared/schemas/estimates'
import type { FindingInput } from '../../shared/schemas/inspections'
import type { PortalDeposit, PortalEstimate } from '../../shared/schemas/portal'
import { expectNoSeriousAxe, screenshot, signInAs, useJourneyBrowser, visible } from './support/browser'
import { linkFrom, mailIdsTo, readLatestMail } from './support/mail'

// The demo workshop's people and jobs (server/db/seed.ts). The technician's own journey works on
// Rhian Calloway's job, so these two stories use the other two customers' jobs and never meet it.
const TECHNICIAN = 'tech@brackenfold4x4.test'
const ADVISOR = 'advisor@brackenfold4x4.test'
const PAYING = { name: 'Tomasz Wren', email: 'tomasz.wren@example.test', concern: 'Vibration through the floor above 50 mph.' }
const DECLINED = {
  name: 'Harriet Oduya',
  email: 'harriet.oduya@example.test',
  concern: 'Oil on the inside of the front wheels after green-laning.',
}

/** Test card numbers the payments fake takes from Stripe's testing page (docker-free-dev/payments-fake/cards.ts). */
const CARD_SUCCEEDS = '4242 4242 4242 4242'
const CARD_DECLINED = '4000 0000 0000 0002'

const browser = useJourneyBrowser()

// ---------------------------------------------------------------------------------------------
// The API, as the signed-in person's own browser session calls it

/** page.request sends no Origin of its own; the app's CSRF check accepts one from its own address. */
async function api<T>(page: Page, method: 'GET' | 'POST' | 'PUT', path: string, data?: unknown): Promise<T> {
  const { baseURL } = inject('e2e')
  const res = await page.request.fetch(`${baseURL}${path}`, { method, data, headers: { Origin: baseURL } })
  if (!res.ok()) throw new Error(`${method} ${path} answered ${res.status()}: ${await res.text()}`)
  return (await res.json()) as T
}

interface JobRow {
  id: string
  concern: string
  customerName: string
}

async function jobWithConcern(page: Page, concern: string): Promise<JobRow> {
  const { items } = await api<{ items: JobRow[] }>(page, 'GET', '/api/jobs?pageSize=100')
  const job = items.find((j) => j.concern === concern)
  if (!job) throw new Error(`No demo job with the concern “${concern}”`)
  return job
}

type NewFinding = Pick<FindingInput, 'title' | 'severity' | 'position' | 'explanation' | 'suggestedRepair'>

/**
 * What the technician found under the vehicle, recorded the way the findings screen saves a finding
 * added by hand. Suggested repairs name codes of the demo labour-time table and parts list
 * (server/db/seed-catalogue.ts).
 */
async function recordFindings(technician: Page, concern: string, findings: NewFinding[]): Promise<string> {
  const job = await jobWithConcern(technician, concern)
  for (const finding of findings) await api(technician, 'POST', `/api/jobs/${job.id}/findings`, finding)
  return job.id
}

// The story's findings on the Trailmaster: two to repair, one the customer may leave for now.
const UJ: NewFinding = {
  title: 'Front prop shaft universal joint worn',
  severity: 'urgent',
  position: 'front',
  explanation: {
    what: 'The universal joint on the front prop shaft has play in all directions.',
    why: 'A worn joint makes the vibration you feel through the floor and can break up.',
    ifLeft: 'If it fails, the prop shaft can flail and damage the floor, pipes and brake lines.',
  },
  // The technician suggests the part; the advisor picks the labour from the labour-time table.
  suggestedRepair: { labour: [], parts: ['UJ-STD'] },
}
const PINION: NewFinding = {
  title: 'Rear pinion oil seal leaking',
  severity: 'soon',
  position: 'rear',
  explanation: {
    what: 'Oil is leaking from the seal where the prop shaft joins the rear axle.',
    why: 'The axle loses oil, and the gears wear quickly once the level drops.',
    ifLeft: 'The differential can run dry and need replacing.',
  },
  suggestedRepair: { labour: ['DIFF-PINION-SEAL-R'], parts: ['PINION-SEAL'] },
}
const BREATHER: NewFinding = {
  title: 'Rear axle breather pipe kinked',
  severity: 'watch',
  position: 'rear',
  explanation: {
    what: 'The breather pipe on the rear axle is kinked behind the fuel tank.',
    why: 'A blocked breather pushes oil past the seals as the axle warms up.',
    ifLeft: 'Seals leak sooner; it is cheap to sort while the vehicle is in.',
  },
  suggestedRepair: { labour: ['RA-209'], parts: [] },
}

const escaped = (text: string) => text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')

/** The item title the estimate gives a finding: the finding's title and its side. */
/** The item's title as the estimate builds it: the side is added unless the finding already names it. */
const itemTitle = (f: NewFinding) => (f.title.toLowerCase().includes(f.position) ? f.title : `${f.title} — ${f.position}`)

// ---------------------------------------------------------------------------------------------
// Reading the screens

/** The "Total" of the advisor's totals panel, every item as if approved. */
async function advisorTotal(page: Page): Promise<string> {
  const table = page.getByRole('table', { name: 'Totals, every item as if approved' })
  return (
    (await table
      .getByRole('row', { name: /^Total\s/ })
      .getByRole('cell')
      .textContent()) ?? ''
  ).trim()
}

async function advisorDeposit(page: Page): Promise<string> {
  const table = page.getByRole('table', { name: 'Totals, every item as if approved' })
  return (
    (await table
      .getByRole('row', { name: /^Deposit \(/ })
      .getByRole('cell')
      .textContent()) ?? ''
  ).trim()
}

async function allSaved(page: Page): Promise<void> {
  await visible(page.getByRole('status').filter({ hasText: /^All changes saved$/ }))
}

/** The customer's sticky bar: "Approved total £… incl. VAT", "Deposit £…". */
function summaryBar(page: Page): Locator {
  return page.getByRole('region', { name: 'Your total' })
}

async function barFigures(page: Page): Promise<string> {
  return (await summaryBar(page).innerText()).replace(/\s+/g, ' ').trim()
}

/** The customer's choice on one item, by its title, waiting until the server has it. */
async function decide(page: Page, title: string, choice: 'Approve' | 'Decline'): Promise<void> {
  const item = page.getByRole('article', { name: new RegExp(`^\\d+\\. ${escaped(title)}$`) })
  const button = item.getByRole('button', { name: new RegExp(`^${choice}\\s+item \\d+$`) })
  await button.click()
  const done = item.getByRole('button', { name: new RegExp(`^${choice}d\\s+item \\d+$`) })
  await expect.poll(() => done.getAttribute('aria-pressed')).toBe('true')
  await item.getByText('Saving your choice…').waitFor({ state: 'hidden' })
}

/**
 * Every [role=status] wording the page shows, in order, as the page changes: a status that is
 * shown for a moment only (until the server answers) is still on the record afterwards.
 */
async function recordStatusWords(page: Page): Promise<void> {
  await page.addInitScript(() => {
    const seen: string[] = []
    Object.assign(window, { __statusWords: seen })
    new MutationObserver(() => {
      for (const el of document.querySelectorAll('[role="status"]')) {
        const words = (el.textContent ?? '').replace(/\s+/g, ' ').trim()
        if (words && seen.at(-1) !== words) seen.push(words)
      }
    }).observe(document, { subtree: true, childList: true, characterData: true })
  })
}

const statusWords = (page: Page) => page.evaluate(() => (window as unknown as { __statusWords?: string[] }).__statusWords ?? [])

/** The fake's hosted card form (docker-free-dev/payments-fake/page.ts). */
async function payByCard(page: Page, cardNumber: string, amount: string): Promise<void> {
  await page.getByLabel('Card number').fill(cardNumber)
  await page.getByLabel('Expiry date (MM / YY)').fill('12 / 34')
  await page.getByLabel('Security code (CVC)').fill('123')
  await page.getByRole('button', { name: `Pay ${amount}` }).click()
}

// ---------------------------------------------------------------------------------------------
// One story: the advisor prices the findings, the customer decides on a phone and pays the
// deposit, and the advisor's open page hears about it. The steps share what they made.

const story: {
  advisor?: Page
  advisorLoads: number
  estimateId?: string
  reference?: string
  customer?: Page
  deposit?: string
  /** When the customer's page first said the deposit was paid, and when the advisor's page did (or why it never did). */
  customerSawPaidAt?: number
  advisorSawPaid?: Promise<number | Error>
} = { advisorLoads: 0 }

describe('from findings to a paid deposit', () => {
  it('the advisor builds the estimate from the findings, adds labour from the lookup and sends it', async () => {
    const technician = await browser.current.newDesktopPage()
    await signInAs(technician, TECHNICIAN)
    const jobId = await recordFindings(technician, PAYING.concern, [UJ, PINION, BREATHER])
    await technician.context().close()

    const page = await browser.current.newDesktopPage()
    story.advisor = page
    await signInAs(page, ADVISOR)

    // From the jobs list to the job, and an estimate started from its findings.
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Jobs' }).click()
    await visible(page.getByRole('heading', { name: 'Jobs', level: 1 }))
    await page.getByRole('link', { name: PAYING.concern }).click()
    await page.waitForURL((url) => url.pathname === `/jobs/${jobId}`)
    await visible(page.getByRole('heading', { name: 'Estimate', level: 2 }))
    await page.getByRole('button', { name: 'Start estimate' }).click()
    await page.waitForURL((url) => /^\/estimates\/[0-9a-f-]{36}$/.test(url.pathname))
    story.estimateId = page.url().split('/').at(-1) as string
    const header = await visible(page.getByRole('heading', { name: /^Estimate E-\d{4}$/, level: 1 }))
    story.reference = ((await header.textContent()) ?? '').replace('Estimate', '').trim()

    // One item for each finding, each with the repair the finding suggested.
    await visible(page.getByRole('heading', { name: 'Items (3)', level: 2 }))
    const ujItem = page.getByRole('article', { name: new RegExp(`^Item \\d: ${escaped(itemTitle(UJ))}$`) })
    const pinionItem = page.getByRole('article', { name: new RegExp(`^Item \\d: ${escaped(itemTitle(PINION))}$`) })
    const breatherItem = page.getByRole('article', { name: new RegExp(`^Item \\d: ${escaped(itemTitle(BREATHER))}$`) })
    await visible(pinionItem.getByRole('group', { name: /line 1 — Labour: Replace rear pinion oil seal$/ }))
    await visible(pinionItem.getByRole('group', { name: /line 2 — Part: Differential pinion oil seal/ }))
    await visible(breatherItem.getByRole('group', { name: /line 1 — Labour: Replace rear axle breather pipe$/ }))
    await visible(ujItem.getByRole('group', { name: /line 1 — Part: Universal joint, standard series/ }))
    expect(await ujItem.getByRole('group', { name: /— Labour:/ }).count()).toBe(0)
    await allSaved(page)
    const totalBefore = await advisorTotal(page)

    // Labour for the UJ from the labour-time lookup, chosen with the keyboard.
    await ujItem.getByRole('button', { name: /^Add labour to item \d$/ }).click()
    const dialog = page.getByRole('dialog')
    await visible(dialog.getByRole('heading', { name: /^Add labour to item \d$/ }))
    const lookup = dialog.getByRole('combobox', { name: 'Find a labour operation' })
    await lookup.pressSequentially('UJ', { delay: 60 })
    const wanted = dialog.getByRole('option', { name: /^Replace front prop shaft universal joint/ })
    await visible(wanted)
    await screenshot(page, 'estimate-1-labour-lookup', { at: wanted })
    const options = await dialog.getByRole('option').count()
    for (let step = 0; step < options && (await wanted.getAttribute('aria-selected')) !== 'true'; step++) await lookup.press('ArrowDown')
    expect(await wanted.getAttribute('aria-selected')).toBe('true')
    await lookup.press('Enter')
    await dialog.waitFor({ state: 'hidden' })
    await visible(ujItem.getByRole('group', { name: /— Labour: Replace front prop shaft universal joint$/ }))
    await visible(ujItem.getByText('PROP-UJ-F'))

    // The totals move, and match the shared engine on the draft the server saved.
    await allSaved(page)
    await expect.poll(() => advisorTotal(page)).not.toBe(totalBefore)
    let saved = await api<EstimateDetail>(page, 'GET', `/api/estimates/${story.estimateId}`)
    expect(await advisorTotal(page)).toBe(
      formatMoney(calculateEstimate(draftToEngineInput(saved.draft, saved.currency)).proposed.gross, saved.currency),
    )

    // A quarter of the approved total as the deposit: the workshop's default asks for none.
    const settings = page.getByRole('region', { name: 'Settings for this estimate' })
    // Vuetify's select opens from the keyboard as from the mouse; its input sits under the field's own box.
    await settings.getByRole('combobox', { name: 'Deposit', exact: true }).press('Enter')
    await page.getByRole('option', { name: 'A percentage of the approved total' }).click()
    await settings.getByLabel('Deposit (%)').fill('25')
    await visible(page.getByRole('row', { name: /^Deposit \(25% of the approved total\)/ }))
    await allSaved(page)
    saved = await api<EstimateDetail>(page, 'GET', `/api/estimates/${story.estimateId}`)
    expect(saved.draft.deposit).toEqual({ kind: 'percent', value: '25' })
    const proposed = calculateEstimate(draftToEngineInput(saved.draft, saved.currency)).proposed
    expect(proposed.deposit).toBeGreaterThan(0)
    expect(await advisorTotal(page)).toBe(formatMoney(proposed.gross, saved.currency))
    expect(await advisorDeposit(page)).toBe(formatMoney(proposed.deposit, saved.currency))
    await screenshot(page, 'estimate-2-builder', { at: ujItem })
    await screenshot(page, 'estimate-3-builder-totals', { at: page.getByRole('heading', { name: 'Totals', level: 2 }) })
    await expectNoSeriousAxe(page, 'advisor estimate builder')

    // Send, past the question that names who it goes to.
    const before = await mailIdsTo(PAYING.email)
    await page.getByRole('main').getByRole('button', { name: 'Send', exact: true }).click()
    const confirm = page.getByRole('dialog')
    await visible(confirm.getByRole('heading', { name: `Send ${story.reference} to ${PAYING.name}?` }))
    await visible(confirm.getByText(PAYING.email))
    await confirm.getByRole('button', { name: 'Send', exact: true }).click()
    await confirm.waitFor({ state: 'hidden' })
    await visible(page.getByText(/^Version 1 sent \d/))
    // The status chip comes first on the page; the version history further down says "Sent" too.
    await visible(page.getByRole('main').getByText(estimateStatusLabels.sent, { exact: true }).first())
    await screenshot(page, 'estimate-4-sent')

    const mail = await readLatestMail(PAYING.email, `Estimate ${story.reference}`, { excluding: before })
    expect(mail.text).toContain(formatMoney(proposed.gross, saved.currency))
    linkFrom(mail, '/portal/open')
    // From here on the advisor's page stays as it is: step 5 reads it without loading it again.
    page.on('load', () => (story.advisorLoads += 1))
  })

  it('the customer decides item by item on a phone, confirms and pays the deposit by card', async () => {
    const { estimateId, reference } = story
    if (!estimateId || !reference) throw new Error('The estimate was not sent in the step before')
    const mail = await readLatestMail(PAYING.email, `Estimate ${reference}`)
    const link = linkFrom(mail, '/portal/open')

    const page = await browser.current.newPhonePage()
    story.customer = page
    await page.goto(link.href)
    await page.waitForURL((url) => url.pathname === `/portal/estimates/${estimateId}`)
    await visible(page.getByRole('heading', { name: /^Your estimate for WN08 PLB$/, level: 1 }))
    // The key in the e-mail's link is not left in the address bar.
    expect(page.url()).not.toContain('token=')
    for (const f of [UJ, PINION, BREATHER])
      await visible(page.getByRole('heading', { name: new RegExp(`^\\d+\\. ${escaped(itemTitle(f))}$`), level: 3 }))

    const shown = await api<PortalEstimate>(page, 'GET', `/api/portal/estimates/${estimateId}`)
    const { snapshot } = shown
    const money = (minor: number) => formatMoney(minor, snapshot.currency)
    const nothingYet = calculateEstimate(snapshotToEngineInput(snapshot, {}))
    const barBefore = await barFigures(page)
    expect(barBefore).toContain(`Approved total ${money(nothingYet.approved.gross)} incl. VAT`)
    expect(barBefore).not.toContain('Deposit')
    await visible(summaryBar(page).getByRole('button', { name: 'Review and confirm' }))
    expect(await summaryBar(page).getByRole('button', { name: 'Review and confirm' }).isDisabled()).toBe(true)
    await screenshot(page, 'customer-1-estimate-before')
    await expectNoSeriousAxe(page, 'customer estimate page')

    // Decline the leak for now; approve the UJ and the breather.
    await decide(page, itemTitle(PINION), 'Decline')
    await decide(page, itemTitle(UJ), 'Approve')
    await decide(page, itemTitle(BREATHER), 'Approve')

    const idOf = (f: NewFinding) => snapshot.items.find((i) => i.title === itemTitle(f))?.id as string
    const decisions: Record<string, Decision> = { [idOf(PINION)]: 'declined', [idOf(UJ)]: 'approved', [idOf(BREATHER)]: 'approved' }
    const expected = calculateEstimate(snapshotToEngineInput(snapshot, decisions)).approved
    expect(expected.gross).toBeGreaterThan(0)
    expect(expected.deposit).toBeGreaterThan(0)
    expect(expected.gross).not.toBe(nothingYet.approved.gross)
    const barAfter = await barFigures(page)
    expect(barAfter).toContain(`Approved total ${money(expected.gross)} incl. VAT`)
    expect(barAfter).toContain(`Deposit ${money(expected.deposit)}`)
    // The server priced the same decisions to the same figures.
    const decided = await api<PortalEstimate>(page, 'GET', `/api/portal/estimates/${estimateId}`)
    expect(decided.decisions).toEqual(decisions)
    expect(decided.result.approved.gross).toBe(expected.gross)
    expect(decided.result.approved.deposit).toBe(expected.deposit)
    story.deposit = money(expected.deposit)
    await screenshot(page, 'customer-2-estimate-after', {
      at: page.getByRole('article', { name: new RegExp(`${escaped(itemTitle(PINION))}$`) }),
    })
    await screenshot(page, 'customer-2b-estimate-after-last-item', {
      at: page.getByRole('article', { name: new RegExp(`${escaped(itemTitle(BREATHER))}$`) }).getByRole('button', { name: /^Approved/ }),
    })
    await expectNoSeriousAxe(page, 'customer estimate page, decided')

    // Review: what is approved and declined, the trader, the cancellation rights, and a consent box that starts empty.
    await summaryBar(page).getByRole('button', { name: 'Review and confirm' }).click()
    await page.waitForURL((url) => url.pathname === `/portal/estimates/${estimateId}/confirm`)
    await visible(page.getByRole('heading', { name: 'Review and confirm', level: 1 }))
    await visible(page.getByRole('heading', { name: 'Work you decline' }))
    const totals = page.getByRole('region', { name: 'Your decisions' }).getByRole('definition')
    expect(await totals.allTextContents()).toEqual([money(expected.gross), money(expected.tax), money(expected.deposit)])
    await visible(page.getByRole('heading', { name: 'Your right to cancel' }))
    const consent = page.getByRole('checkbox', { name: shown.cancellation.startWithinPeriodText })
    expect(await consent.isChecked()).toBe(false)
    await expectNoSeriousAxe(page, 'customer confirm page')
    await consent.check()
    expect(await consent.isChecked()).toBe(true)
    const commit = page.getByRole('button', { name: `Confirm and agree to pay ${money(expected.gross)}` })
    await screenshot(page, 'customer-3-confirm', { at: commit })
    await commit.click()

    await visible(page.getByRole('heading', { name: 'Thank you', level: 1 }))
    await visible(page.getByText(`You agreed to ${money(expected.gross)} of work on WN08 PLB.`, { exact: false }))
    await expectNoSeriousAxe(page, 'customer confirm page, confirmed')
    const pay = page.getByRole('button', { name: `Pay deposit ${money(expected.deposit)}` })
    await screenshot(page, 'customer-4-deposit-due', { at: pay })

    // To the payment provider's page, and back once the card is taken.
    const { paymentsURL } = inject('e2e')
    await recordStatusWords(page)
    await pay.click()
    await page.waitForURL((url) => url.href.startsWith(`${paymentsURL}/c/pay/`))
    await visible(page.getByText(money(expected.deposit)).first())
    await screenshot(page, 'customer-5-payment-page')
    const receiptsBefore = await mailIdsTo(PAYING.email)
    // The advisor's page, open since step 3, is watched from the moment the card goes in.
    const advisor = story.advisor
    if (advisor) {
      story.advisorSawPaid = visible(advisor.getByText(estimateStatusLabels.deposit_paid, { exact: true }), 60_000).then(
        () => Date.now(),
        (err: unknown) => (err instanceof Error ? err : new Error(String(err))),
      )
    }
    await payByCard(page, CARD_SUCCEEDS, money(expected.deposit))

    await page.waitForURL((url) => url.pathname === `/portal/estimates/${estimateId}/paid`, { timeout: 30_000 })
    const paidText = `Deposit paid — ${money(expected.deposit)}, receipt sent to your e-mail.`
    await visible(page.getByRole('status').filter({ hasText: paidText }), 30_000)
    story.customerSawPaidAt = Date.now()
    const words = await statusWords(page)
    expect(words).toContain('Payment being confirmed…')
    expect(words.indexOf('Payment being confirmed…')).toBeLessThan(words.indexOf(paidText))
    await visible(page.getByRole('heading', { name: 'Thank you', level: 1 }))
    await screenshot(page, 'customer-6-paid')
    await expectNoSeriousAxe(page, 'customer paid page')

    const deposit = await api<PortalDeposit>(page, 'GET', `/api/portal/estimates/${estimateId}/deposit`)
    expect(deposit).toMatchObject({ status: 'paid', amountMinor: expected.deposit })
    const receipt = await readLatestMail(PAYING.email, `Deposit received for estimate ${reference}`, {
      excluding: receiptsBefore,
      timeoutMs: 30_000,
    })
    expect(receipt.text).toContain(money(expected.deposit))
  })

  it('the advisor’s open estimate page shows the deposit paid, without reloading', async () => {
    const page = story.advisor
    if (!page || !story.deposit || !story.advisorSawPaid || !story.customerSawPaidAt) throw new Error('The steps before did not finish')
    expect(page.isClosed()).toBe(false)
    expect(new URL(page.url()).pathname).toBe(`/estimates/${story.estimateId}`)
    // Heard live: within a few seconds of the customer's own page (which asks the server every 1.5 s).
    const advisorSawPaidAt = await story.advisorSawPaid
    if (advisorSawPaidAt instanceof Error) throw advisorSawPaidAt
    const lag = advisorSawPaidAt - story.customerSawPaidAt
    process.stdout.write(
      `[e2e] the advisor's page showed the deposit paid ${Math.abs(lag)} ms ${lag < 0 ? 'before' : 'after'} the customer's page\n`,
    )
    expect(lag).toBeLessThan(5_000)
    await visible(page.getByText(estimateStatusLabels.deposit_paid, { exact: true }))
    await visible(page.getByRole('button', { name: 'Refund deposit' }))
    // The customer's decisions reached the items and the totals on the same page.
    await visible(page.getByRole('article', { name: new RegExp(`${escaped(itemTitle(PINION))}$`) }).getByText(/^Declined by customer/))
    await visible(page.getByRole('article', { name: new RegExp(`${escaped(itemTitle(UJ))}$`) }).getByText(/^Approved by customer/))
    await visible(page.getByRole('row', { name: `Deposit due ${story.deposit}` }))
    expect(story.advisorLoads).toBe(0)
    await screenshot(page, 'estimate-5-advisor-deposit-paid')
  })
})

describe('a declined card', () => {
  it('says the payment did not go through and marks nothing paid', async () => {
    // A second estimate, for another customer, made and sent through the API by the same people.
    const technician = await browser.current.newDesktopPage()
    await signInAs(technician, TECHNICIAN)
    const seal: NewFinding = {
      title: 'Swivel housing seal leaking',
      severity: 'soon',
      position: 'left',
      explanation: {
        what: 'Oil is running from the swivel housing seal onto the inside of the wheel.',
        why: 'The seal that keeps the oil in also keeps water and mud out.',
        ifLeft: 'The swivel bearings and the CV joint run short of oil and wear.',
      },
      suggestedRepair: { labour: ['SWV-SEAL'], parts: ['SWV-SEAL-KIT'] },
    }
    const grease: NewFinding = {
      title: 'Swivel housing oil low',
      severity: 'watch',
      position: 'right',
      explanation: {
        what: 'The right swivel housing is low on oil.',
        why: 'Low oil wears the bearings.',
        ifLeft: 'The bearings wear sooner.',
      },
      suggestedRepair: { labour: ['FA-111'], parts: [] },
    }
    const jobId = await recordFindings(technician, DECLINED.concern, [seal, grease])
    await technician.context().close()

    const advisor = await browser.current.newDesktopPage()
    await signInAs(advisor, ADVISOR)
    const { items: findings } = await api<{ items: { id: string }[] }>(advisor, 'GET', `/api/jobs/${jobId}/findings`)
    const created = await api<EstimateDetail>(advisor, 'POST', '/api/estimates', { jobId, findingIds: findings.map((f) => f.id) })
    const withDeposit = await api<EstimateDetail>(advisor, 'PUT', `/api/estimates/${created.id}/draft`, {
      revision: created.revision,
      draft: { ...created.draft, deposit: { kind: 'percent', value: '30' } },
    })
    const before = await mailIdsTo(DECLINED.email)
    await api(advisor, 'POST', `/api/estimates/${created.id}/send`, { revision: withDeposit.revision })
    const mail = await readLatestMail(DECLINED.email, `Estimate ${created.reference}`, { excluding: before })

    // The customer approves both items, confirms and tries to pay with a card that is refused.
    const page = await browser.current.newPhonePage()
    await page.goto(linkFrom(mail, '/portal/open').href)
    await page.waitForURL((url) => url.pathname === `/portal/estimates/${created.id}`)
    await decide(page, itemTitle(seal), 'Approve')
    await decide(page, itemTitle(grease), 'Approve')
    await summaryBar(page).getByRole('button', { name: 'Review and confirm' }).click()
    await page.getByRole('button', { name: /^Confirm and agree to pay / }).click()
    await visible(page.getByRole('heading', { name: 'Thank you', level: 1 }))
    const due = await api<PortalDeposit>(page, 'GET', `/api/portal/estimates/${created.id}/deposit`)
    expect(due.status).toBe('awaiting_payment')
    const amount = formatMoney(due.amountMinor, due.currency)
    await page.getByRole('button', { name: `Pay deposit ${amount}` }).click()
    await page.waitForURL((url) => url.href.startsWith(`${inject('e2e').paymentsURL}/c/pay/`))
    await payByCard(page, CARD_DECLINED, amount)

    // The provider's page says so, in words, and keeps the customer there to try again.
    const refused = await visible(page.getByRole('alert'))
    expect(await refused.textContent()).toMatch(/Payment not taken\.\s+Your card was declined\./)
    await screenshot(page, 'declined-1-payment-page', { at: refused })

    // Back to the workshop's page: it says no money was taken and offers the payment again.
    await page.getByRole('link', { name: /^← Back to / }).click()
    await page.waitForURL((url) => url.pathname === `/portal/estimates/${created.id}`)
    const notTaken = await visible(page.getByRole('alert').filter({ hasText: 'The payment did not go through — no money was taken.' }))
    await visible(page.getByRole('button', { name: `Pay deposit ${amount}` }))
    await screenshot(page, 'declined-2-back-in-portal', { at: notTaken })
    await expectNoSeriousAxe(page, 'customer estimate page, payment declined')

    // Nothing is marked paid, for the customer or the workshop.
    const after = await api<PortalDeposit>(page, 'GET', `/api/portal/estimates/${created.id}/deposit`)
    expect(after).toMatchObject({ status: 'awaiting_payment', paidAt: null })
    const seen = await api<EstimateDetail>(advisor, 'GET', `/api/estimates/${created.id}`)
    expect(seen.status).toBe('confirmed')
    await advisor.goto(`/estimates/${created.id}`)
    await visible(advisor.getByText(estimateStatusLabels.confirmed, { exact: true }))
    expect(await advisor.getByText(estimateStatusLabels.deposit_paid, { exact: true }).count()).toBe(0)
    await advisor.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Estimates' }).click()
    const row = advisor.getByRole('row').filter({ hasText: created.reference })
    await visible(row)
    expect(await row.textContent()).not.toContain(estimateStatusLabels.deposit_paid)
    await visible(row.getByText(estimateStatusLabels.confirmed, { exact: true }))
  })
})
