/**
 * The estimate as a PDF the customer keeps: what was proposed, what they decided, and the
 * record of that decision. Every figure comes from the engine's result and is formatted by
 * shared/money.ts, so the PDF shows the same money as the phone and the advisor's screen.
 */
import type { RGB } from 'pdf-lib'
import { drawLabel, drawLabelledColumns, drawLetterhead, LABEL_HEIGHT } from '../../lib/pdf/blocks'
import { calendarDate, dateTimeWithZone, longDate, shortDateTime } from '../../lib/pdf/dates'
import { BOTTOM, COPPER, GREY, hex, INK, LEFT, RIGHT, RULE, SLATE, TOP, WHITE } from '../../lib/pdf/layout'
import { amountRows, Table, type AmountRow, type Column } from '../../lib/pdf/table'
import { startDocument, type Writer } from '../../lib/pdf/writer'
import { formatMoney } from '../../../shared/money'
import type { EstimateResult, ItemLineResult, ItemResult, ScopeResult } from '../../../shared/estimate/contract'
import type { EstimateSnapshot, SnapshotItem } from '../../../shared/schemas/estimates'
import { severities } from '../../../shared/schemas/severity'

export interface PdfDecisionRecord {
  /** ISO timestamp. */
  confirmedAt: string
  decisions: Record<string, 'approved' | 'declined'>
  consents: { startWithinCancellationPeriod: boolean; cancellationInformationShown: boolean }
  versionHash: string
  ip: string | null
  userAgent: string | null
}

export interface PdfDeposit {
  amountMinor: number
  status: 'awaiting_payment' | 'paid' | 'refunded'
  paidAt: string | null
  refundedMinor: number | null
}

export interface EstimatePdfInput {
  snapshot: EstimateSnapshot
  result: EstimateResult
  /** ISO timestamp. */
  sentAt: string
  /** The workshop's IANA time zone; dates and times are shown in it. */
  timezone: string
  decision?: PdfDecisionRecord | null
  deposit?: PdfDeposit | null
  /** SHA-256 of this version's content, hex. */
  hash: string
}

const APPROVED_COLOUR = hex(severities.ok.colour)
const DECLINED_COLOUR = hex(severities.urgent.colour)

/** Columns of an item's lines. */
const ITEM_INDENT = LEFT + 24
const COL_KIND = ITEM_INDENT
const COL_DESCRIPTION = ITEM_INDENT + 46
const COL_DETAIL = ITEM_INDENT + 262
const COL_TAX_RIGHT = RIGHT - 78
const COL_AMOUNT_RIGHT = RIGHT
const DESCRIPTION_WIDTH = COL_DETAIL - COL_DESCRIPTION - 8
const DETAIL_WIDTH = COL_TAX_RIGHT - 40 - COL_DETAIL

const KIND_WORDS = { labour: 'Labour', part: 'Part', fee: 'Fee' } as const

/** Renders one sent version of an estimate, with the customer's decision and deposit when there are any. */
export async function renderEstimatePdf(input: EstimatePdfInput): Promise<Uint8Array> {
  const { snapshot, result, sentAt, timezone, hash } = input
  const decision = input.decision ?? null
  const deposit = input.deposit ?? null

  const title = `Estimate ${snapshot.reference} · version ${snapshot.version}`
  const w = await startDocument(
    {
      title: `${title} — ${snapshot.workshop.name}`,
      author: snapshot.workshop.name,
      subject: `${snapshot.vehicle.registration} for ${snapshot.customer.name}`,
      createdAt: new Date(sentAt),
      modifiedAt: new Date(latest([sentAt, decision?.confirmedAt, deposit?.paidAt])),
    },
    { left: snapshot.workshop.name, right: `${title} (continued)` },
  )

  drawLetterhead(w, snapshot.workshop, title, [`Sent ${longDate(sentAt, timezone)}`, `Valid until ${calendarDate(snapshot.expiresOn)}`])
  drawParties(w, snapshot)
  if (snapshot.message.trim() !== '') drawMessage(w, snapshot.message)

  const itemsById = new Map(snapshot.items.map((i) => [i.id, i]))
  w.y -= 6
  w.sectionHeading(decision ? 'Items and decisions' : 'Items')
  if (!decision) {
    w.paragraph('Each item can be approved or declined on its own.', LEFT, RIGHT - LEFT, { size: 9, color: GREY })
    w.y -= 4
  }
  snapshot.items.forEach((item, i) => {
    const priced = result.items[i]
    if (!priced || priced.id !== item.id) throw new Error(`The result does not match the snapshot at item ${i + 1}`)
    // Totals for the approved scope are only right when the result was priced with these decisions.
    if (decision && priced.decision !== (decision.decisions[item.id] ?? 'pending')) {
      throw new Error(`The result was priced with another decision for item ${item.number} than the decision record`)
    }
    drawItem(w, item, priced, result, decision, itemsById)
  })

  drawTotals(w, result, decision ? result.approved : result.proposed, decision !== null, deposit, timezone)
  if (decision) drawDecision(w, decision, snapshot, timezone)
  drawFingerprint(w, hash)

  return w.finish(`${snapshot.reference} · version ${snapshot.version} · ${snapshot.workshop.name}`)
}

function latest(times: (string | null | undefined)[]): string {
  return times.filter((t): t is string => typeof t === 'string').reduce((a, b) => (Date.parse(b) > Date.parse(a) ? b : a))
}

function drawParties(w: Writer, s: EstimateSnapshot): void {
  const customer = [s.customer.name, s.customer.email].filter((l): l is string => !!l)
  const vehicle = [
    s.vehicle.registration,
    [s.vehicle.make, s.vehicle.model, s.vehicle.year === null ? '' : String(s.vehicle.year)].filter((p) => p.trim() !== '').join(' '),
    s.vehicle.vin ? `VIN ${s.vehicle.vin}` : null,
  ].filter((l): l is string => !!l && l.trim() !== '')
  drawLabelledColumns(w, [
    { label: 'CUSTOMER', lines: customer },
    { label: 'VEHICLE', lines: vehicle },
  ])
}

function drawMessage(w: Writer, message: string): void {
  w.ensure(40)
  drawLabel(w, 'MESSAGE FROM THE WORKSHOP', LEFT, w.y)
  w.y -= LABEL_HEIGHT
  w.paragraph(message, LEFT, RIGHT - LEFT, { size: 10 })
  w.y -= 8
}

function decisionWord(item: SnapshotItem, decision: PdfDecisionRecord | null): { text: string; color: RGB } | null {
  if (!decision) return null
  const d = decision.decisions[item.id]
  if (d === 'approved') return { text: 'Approved', color: APPROVED_COLOUR }
  if (d === 'declined') return { text: 'Declined', color: DECLINED_COLOUR }
  return { text: 'Not decided', color: GREY }
}

function lineColumns(taxMode: EstimateResult['taxMode']): Column[] {
  return [
    { heading: 'Kind', x: COL_KIND, style: { size: 8.5, color: GREY } },
    { heading: 'Description', x: COL_DESCRIPTION, wrapWidth: DESCRIPTION_WIDTH },
    { heading: 'Quantity × price', x: COL_DETAIL, wrapWidth: DETAIL_WIDTH },
    { heading: 'VAT', x: COL_TAX_RIGHT, align: 'right' },
    { heading: taxMode === 'exclusive' ? 'Amount excl. VAT' : 'Amount incl. VAT', x: COL_AMOUNT_RIGHT, align: 'right' },
  ]
}

function lineDetail(line: SnapshotItem['lines'][number], currency: string): string {
  switch (line.kind) {
    case 'labour':
      return `${line.hours} h × ${formatMoney(line.rate, currency)}`
    case 'part':
      return `${line.quantity} × ${formatMoney(line.unitPrice, currency)}`
    case 'fee':
      return ''
  }
}

function drawItem(
  w: Writer,
  item: SnapshotItem,
  priced: ItemResult,
  result: EstimateResult,
  decision: PdfDecisionRecord | null,
  items: ReadonlyMap<string, SnapshotItem>,
): void {
  const currency = result.currency
  const word = decisionWord(item, decision)
  const wordStyle = { font: w.bold, size: 10 }
  const wordWidth = word ? w.width(word.text, wordStyle) + 12 : 0
  const titleStyle = { font: w.bold, size: 11, color: SLATE }
  const titleLines = w.wrap(item.title, RIGHT - ITEM_INDENT - wordWidth, titleStyle)

  // Keep the heading with the severity and at least the first line.
  w.ensure(titleLines.length * 14 + 60)
  w.y -= 4
  w.rule(RULE, 0.5)
  w.y -= 6
  w.draw(String(item.number), LEFT, w.y - 11, { font: w.bold, size: 11, color: COPPER })
  if (word) w.drawRight(word.text, RIGHT, w.y - 11, { ...wordStyle, color: word.color })
  for (const line of titleLines) {
    w.draw(line, ITEM_INDENT, w.y - 11, titleStyle)
    w.y -= 14
  }
  w.y -= 2

  // Severity: word on its own colour, so it reads without colour too.
  const severity = severities[item.severity]
  const badgeStyle = { font: w.bold, size: 8, color: WHITE }
  const badgeText = severity.label
  const badgeWidth = w.width(badgeText, badgeStyle) + 10
  w.page.drawRectangle({ x: ITEM_INDENT, y: w.y - 12, width: badgeWidth, height: 12, color: hex(severity.colour) })
  w.draw(badgeText, ITEM_INDENT + 5, w.y - 9, badgeStyle)
  w.y -= 17

  const textWidth = RIGHT - ITEM_INDENT
  if (item.customerNote.trim() !== '') w.paragraph(item.customerNote, ITEM_INDENT, textWidth, { size: 9.5 })
  if (item.measurement) w.paragraph(`Measured: ${item.measurement}`, ITEM_INDENT, textWidth, { size: 9.5, color: GREY })
  if (item.explanation) {
    w.paragraph(`Why it matters: ${item.explanation.why}`, ITEM_INDENT, textWidth, { size: 9, color: GREY })
    w.paragraph(`If left: ${item.explanation.ifLeft}`, ITEM_INDENT, textWidth, { size: 9, color: GREY })
  }
  const needs = item.requires.map((id) => items.get(id)).filter((i): i is SnapshotItem => !!i)
  if (needs.length > 0) {
    w.paragraph(`Can only be done together with ${needs.map((n) => `item ${n.number}`).join(', ')}.`, ITEM_INDENT, textWidth, {
      size: 9,
      color: GREY,
    })
  }
  w.y -= 3

  w.ensure(24)
  const table = new Table(w, lineColumns(result.taxMode), { size: 9.5, leading: 12.5 })
  table.headings()
  w.onContinue = () => {
    const style = { font: w.bold, size: 9, color: SLATE }
    const heading = w.wrap(`Item ${item.number} (continued): ${item.title}`, RIGHT - ITEM_INDENT - 12, style)
    w.draw(`${heading[0] ?? ''}${heading.length > 1 ? ' …' : ''}`, ITEM_INDENT, w.y - 9, style)
    w.y -= 14
    table.headings()
  }

  priced.lines.forEach((line, j) => {
    const source = item.lines[j]
    if (!source) throw new Error(`The result has more lines than item ${item.number}`)
    // The last line keeps the item total company, so a total never starts a page alone.
    drawLine(table, line, source, currency, j === priced.lines.length - 1 ? ITEM_TOTAL_HEIGHT : 0)
  })

  w.onContinue = null
  w.ensure(ITEM_TOTAL_HEIGHT)
  w.y -= 2
  const totals = `Net ${formatMoney(priced.net, currency)}   VAT ${formatMoney(priced.tax, currency)}   `
  const grossText = `Item total ${formatMoney(priced.gross, currency)}`
  const grossWidth = w.width(grossText, { font: w.bold, size: 9.5 })
  w.drawRight(grossText, RIGHT, w.y - 9.5, { font: w.bold, size: 9.5, color: SLATE })
  w.drawRight(totals, RIGHT - grossWidth, w.y - 9.5, { size: 9, color: GREY })
  w.y -= ITEM_TOTAL_HEIGHT - 2
}

const ITEM_TOTAL_HEIGHT = 18

function drawLine(table: Table, line: ItemLineResult, source: SnapshotItem['lines'][number], currency: string, keepWith: number): void {
  const saving = line.sharedSaving > 0 ? ` — saves ${formatMoney(line.sharedSaving, currency)} (${line.sharedHours} h)` : ''
  const note = line.note
    ? {
        text: `Shared access: ${line.note}${saving}`,
        x: COL_DESCRIPTION,
        width: COL_TAX_RIGHT - COL_DESCRIPTION,
        size: 8.5,
        leading: 11,
        color: COPPER,
      }
    : undefined
  table.row(
    [
      KIND_WORDS[line.kind],
      line.description || KIND_WORDS[line.kind],
      lineDetail(source, currency),
      `${line.taxRate}%`,
      formatMoney(line.amount, currency),
    ],
    { note, keepWith },
  )
}

const DEPOSIT_NOTES: Record<NonNullable<ScopeResult['depositAdjustment']>, string> = {
  'capped-at-gross': 'limited to the total',
  'raised-to-minimum': 'raised to the smallest card payment',
  'gross-below-minimum': 'none: the total is below the smallest card payment',
}

function drawTotals(
  w: Writer,
  result: EstimateResult,
  scope: ScopeResult,
  decided: boolean,
  deposit: PdfDeposit | null,
  timezone: string,
): void {
  const c = result.currency
  const money = (amount: number) => formatMoney(amount, c)
  const rows: AmountRow[] = [
    { label: 'Labour', value: money(scope.labour) },
    { label: 'Parts', value: money(scope.parts) },
    { label: 'Fees', value: money(scope.fees) },
  ]
  if (scope.sharedSaving > 0)
    rows.push({ label: 'Saved by shared access (already taken off labour)', value: money(scope.sharedSaving), color: COPPER })
  if (scope.discount > 0) rows.push({ label: 'Discount', value: `−${money(scope.discount)}` })
  rows.push({ label: 'Net', value: money(scope.net), ruleAbove: true })
  for (const r of scope.taxByRate) rows.push({ label: `VAT ${r.rate}% on net ${money(r.net)}`, value: money(r.tax) })
  if (scope.taxByRate.length > 1) rows.push({ label: 'VAT in total', value: money(scope.tax) })
  rows.push({
    label: decided ? 'Total for approved work' : 'Total if every item is approved',
    value: money(scope.gross),
    strong: true,
    ruleAbove: true,
  })
  const depositNote = scope.depositAdjustment ? ` (${DEPOSIT_NOTES[scope.depositAdjustment]})` : ''
  rows.push({ label: `Deposit due${depositNote}`, value: money(scope.deposit), strong: true })
  if (deposit) rows.push({ label: depositStatus(deposit, c, timezone), value: '', color: GREY })

  let intro = decided
    ? 'Totals for the items the customer approved.'
    : 'The customer decides on each item. These totals are for the whole estimate as proposed; the total changes with the items approved.'
  // Before any decision each item is priced as if approved alone, so with shared access the
  // item totals add up to more than the proposed total.
  if (!decided && scope.sharedSaving > 0)
    intro += ' Access work shared between items is charged once, so the total is less than the item totals added up.'
  const introLines = w.wrap(intro, RIGHT - LEFT, { size: 9 })
  const totals = amountRows(w, rows)

  w.y -= 8
  w.ensure(18 + introLines.length * 12 + totals.height + 16)
  w.sectionHeading(decided ? 'Totals — approved work' : 'Totals — all items as proposed')
  for (const text of introLines) {
    w.draw(text, LEFT, w.y - 9, { size: 9, color: GREY })
    w.y -= 12
  }
  w.y -= 4
  totals.draw()
  w.y -= 10
}

function depositStatus(deposit: PdfDeposit, currency: string, timezone: string): string {
  const amount = formatMoney(deposit.amountMinor, currency)
  switch (deposit.status) {
    case 'awaiting_payment':
      return `Deposit of ${amount} awaiting payment`
    case 'paid':
      return deposit.paidAt ? `Deposit paid ${shortDateTime(deposit.paidAt, timezone)} (${amount})` : `Deposit paid (${amount})`
    case 'refunded': {
      const refunded = formatMoney(deposit.refundedMinor ?? deposit.amountMinor, currency)
      const paid = deposit.paidAt ? `paid ${shortDateTime(deposit.paidAt, timezone)}, ` : ''
      return `Deposit of ${amount} ${paid}${refunded} refunded`
    }
  }
}

function drawDecision(w: Writer, d: PdfDecisionRecord, s: EstimateSnapshot, timezone: string): void {
  const approved = s.items.filter((i) => d.decisions[i.id] === 'approved').length
  const declined = s.items.filter((i) => d.decisions[i.id] === 'declined').length
  const yesNo = (b: boolean) => (b ? 'yes' : 'no')
  const rows: { text: string; size: number; color?: RGB }[] = [
    { text: `Confirmed ${dateTimeWithZone(d.confirmedAt, timezone)}`, size: 9.5 },
    { text: `Items approved: ${approved} of ${s.items.length}; declined: ${declined}`, size: 9.5 },
    {
      text: `Asked for work to start within the 14-day cancellation period: ${yesNo(d.consents.startWithinCancellationPeriod)}`,
      size: 9.5,
    },
    { text: `Shown the cancellation information: ${yesNo(d.consents.cancellationInformationShown)}`, size: 9.5 },
    { text: 'Version confirmed (SHA-256 of its content):', size: 9.5 },
    { text: d.versionHash, size: 7.5, color: GREY },
    { text: `IP address: ${d.ip ?? 'not recorded'}`, size: 9.5 },
    { text: `Browser: ${d.userAgent ?? 'not recorded'}`, size: 8, color: GREY },
  ]
  const wrapped = rows.map((r) => ({ ...r, lines: w.wrap(r.text, RIGHT - LEFT, { size: r.size }) }))
  const height = 22 + wrapped.reduce((sum, r) => sum + r.lines.length * r.size * 1.4, 0)
  w.ensure(Math.min(height, TOP - BOTTOM))
  w.sectionHeading("Customer's decision")
  for (const r of wrapped) {
    for (const line of r.lines) {
      w.ensure(r.size * 1.4)
      w.draw(line, LEFT, w.y - r.size, { size: r.size, color: r.color ?? INK })
      w.y -= r.size * 1.4
    }
  }
  w.y -= 10
}

function drawFingerprint(w: Writer, hash: string): void {
  w.ensure(30)
  w.rule(RULE, 0.5)
  w.y -= 6
  w.paragraph('Content fingerprint of this version (SHA-256):', LEFT, RIGHT - LEFT, { size: 8, color: GREY })
  w.paragraph(hash, LEFT, RIGHT - LEFT, { size: 7.5, color: GREY })
}
