/**
 * The estimate as a PDF the customer keeps: what was proposed, what they decided, and the
 * record of that decision. Every figure comes from the engine's result and is formatted by
 * shared/money.ts, so the PDF shows the same money as the phone and the advisor's screen.
 */
import fs from 'node:fs/promises'
import { createRequire } from 'node:module'
import { inflateSync } from 'node:zlib'
import fontkit from '@pdf-lib/fontkit'
import { PDFDocument, rgb, type PDFFont, type PDFPage, type RGB } from 'pdf-lib'
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

// ---------------------------------------------------------------------------------------------
// Fonts. The files are read once per process; pdf-lib needs a fresh embedding per document.

interface FontFiles {
  /** Plain TrueType, unpacked from the WOFF files. */
  regular: Uint8Array
  bold: Uint8Array
  /** Code points both weights can draw; anything else is shown as '?'. */
  characters: ReadonlySet<number>
}

/** Something that measures text, as pdf-lib's fonts do. */
export interface TextMeasure {
  widthOfTextAtSize(text: string, size: number): number
}

/**
 * fontkit as pdf-lib sees it, with text laid out one glyph per character. pdf-lib runs fontkit's
 * whole OpenType shaper on every string it measures or draws, and that was over half the time of
 * a render (measured). pdf-lib ignores the shaper's positions (kerning) anyway, so all that is
 * given up is ligatures, which also keeps copied text plain ("fi", not one ligature glyph).
 */
const plainLayoutFontkit: Parameters<PDFDocument['registerFontkit']>[0] = {
  create(bytes, postscriptName) {
    const font = fontkit.create(bytes, postscriptName)
    const layout = (text: string) =>
      ({ glyphs: Array.from(text, (ch) => font.glyphForCodePoint(ch.codePointAt(0)!)) }) as unknown as ReturnType<typeof font.layout>
    return Object.assign(font, { layout })
  },
}

const require = createRequire(import.meta.url)
const FONT_FILES = {
  regular: '@fontsource/lato/files/lato-latin-400-normal.woff',
  bold: '@fontsource/lato/files/lato-latin-700-normal.woff',
} as const

let fontFiles: Promise<FontFiles> | null = null

function loadFontFiles(): Promise<FontFiles> {
  fontFiles ??= (async () => {
    const [regular, bold] = (
      await Promise.all([fs.readFile(require.resolve(FONT_FILES.regular)), fs.readFile(require.resolve(FONT_FILES.bold))])
    ).map(woffToSfnt) as [Uint8Array, Uint8Array]
    const boldSet = new Set(fontkit.create(bold).characterSet)
    const characters = new Set(fontkit.create(regular).characterSet.filter((c) => boldSet.has(c)))
    return { regular, bold, characters }
  })().catch((error: unknown) => {
    // A failed read is not cached, so a fixed install works without a restart.
    fontFiles = null
    throw error
  })
  return fontFiles
}

/**
 * Unpacks a WOFF 1.0 file into the plain TrueType/OpenType font it wraps (W3C WOFF 1.0, sections
 * 3–5: a header, a table directory, each table zlib-compressed when that made it smaller).
 * fontkit can read WOFF itself, but it inflates a table again every time it reads from it: once
 * per glyph for the outlines, which was most of the time of a render (measured).
 */
export function woffToSfnt(woff: Uint8Array): Uint8Array {
  const view = new DataView(woff.buffer, woff.byteOffset, woff.byteLength)
  if (woff.byteLength < 44 || view.getUint32(0) !== 0x774f4646) throw new Error('Not a WOFF 1.0 font file')
  const flavor = view.getUint32(4)
  const numTables = view.getUint16(12)
  const tables = Array.from({ length: numTables }, (_, i) => {
    const at = 44 + i * 20
    const tag = view.getUint32(at)
    const offset = view.getUint32(at + 4)
    const compLength = view.getUint32(at + 8)
    const origLength = view.getUint32(at + 12)
    const checksum = view.getUint32(at + 16)
    const stored = woff.subarray(offset, offset + compLength)
    const data = compLength < origLength ? new Uint8Array(inflateSync(stored)) : stored
    if (data.byteLength !== origLength) throw new Error('A table of the WOFF font file has the wrong length')
    return { tag, checksum, data }
  })
  // The sfnt directory is sorted by tag, as the WOFF one already is; sorting again costs nothing.
  tables.sort((a, b) => a.tag - b.tag)
  const pad = (n: number) => (n + 3) & ~3
  const headerLength = 12 + numTables * 16
  const out = new Uint8Array(tables.reduce((sum, t) => sum + pad(t.data.byteLength), headerLength))
  const outView = new DataView(out.buffer)
  const power = 2 ** Math.floor(Math.log2(numTables))
  outView.setUint32(0, flavor)
  outView.setUint16(4, numTables)
  outView.setUint16(6, power * 16)
  outView.setUint16(8, Math.log2(power))
  outView.setUint16(10, numTables * 16 - power * 16)
  let offset = headerLength
  tables.forEach((t, i) => {
    const at = 12 + i * 16
    outView.setUint32(at, t.tag)
    outView.setUint32(at + 4, t.checksum)
    outView.setUint32(at + 8, offset)
    outView.setUint32(at + 12, t.data.byteLength)
    out.set(t.data, offset)
    offset += pad(t.data.byteLength)
  })
  return out
}

// ---------------------------------------------------------------------------------------------
// Page geometry (points) and colours.

const PAGE_WIDTH = 595.28
const PAGE_HEIGHT = 841.89
const LEFT = 50
const RIGHT = PAGE_WIDTH - 50
const TOP = PAGE_HEIGHT - 48
/** Nothing but the footer goes below this line. */
const BOTTOM = 62
const FOOTER_BASELINE = 34

const SLATE = hex('#1F3A4D')
const COPPER = hex('#C8642B')
const INK = hex('#222222')
const GREY = hex('#5F6B73')
const RULE = hex('#C9D1D6')
const WHITE = rgb(1, 1, 1)
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

function hex(colour: string): RGB {
  const n = Number.parseInt(colour.slice(1), 16)
  return rgb(((n >> 16) & 255) / 255, ((n >> 8) & 255) / 255, (n & 255) / 255)
}

// ---------------------------------------------------------------------------------------------
// Dates in the workshop's time zone.

const dateFormats = new Map<string, Intl.DateTimeFormat>()

function formatter(key: string, options: Intl.DateTimeFormatOptions): Intl.DateTimeFormat {
  let format = dateFormats.get(key)
  if (!format) {
    format = new Intl.DateTimeFormat('en-GB', options)
    dateFormats.set(key, format)
  }
  return format
}

function parts(iso: string, timeZone: string, month: 'long' | 'short', withZone: boolean): Record<string, string> {
  const format = formatter(`${timeZone}|${month}|${withZone}`, {
    timeZone,
    day: 'numeric',
    month,
    year: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
    ...(withZone ? { timeZoneName: 'short' } : {}),
  })
  const out: Record<string, string> = {}
  for (const p of format.formatToParts(new Date(iso))) out[p.type] = p.value
  return out
}

/** "2 December 2026" */
function longDate(iso: string, timeZone: string): string {
  const p = parts(iso, timeZone, 'long', false)
  return `${p.day} ${p.month} ${p.year}`
}

/** "2 Dec 2026 14:03" */
function shortDateTime(iso: string, timeZone: string): string {
  const p = parts(iso, timeZone, 'short', false)
  return `${p.day} ${p.month} ${p.year} ${p.hour}:${p.minute}`
}

/** "2 December 2026 at 14:03 GMT (Europe/London)" */
function dateTimeWithZone(iso: string, timeZone: string): string {
  const p = parts(iso, timeZone, 'long', true)
  return `${p.day} ${p.month} ${p.year} at ${p.hour}:${p.minute} ${p.timeZoneName} (${timeZone})`
}

/** A calendar date ("2026-12-16") is the same day everywhere, so it is read and shown in UTC. */
function calendarDate(isoDate: string): string {
  return longDate(`${isoDate}T12:00:00Z`, 'UTC')
}

// ---------------------------------------------------------------------------------------------
// Text: characters the font lacks, and word wrap.

/** Replaces what Lato cannot draw with '?', and control characters (line breaks included) with spaces. */
function drawable(text: string, characters: ReadonlySet<number>): string {
  let out = ''
  for (const ch of text) {
    const code = ch.codePointAt(0)!
    if (code < 0x20 || (code >= 0x7f && code < 0xa0)) out += ' '
    else out += characters.has(code) ? ch : '?'
  }
  return out
}

/**
 * Greedy word wrap. Word widths are added up rather than each candidate line measured again,
 * which is exact while text is drawn one glyph per character without kerning (as pdf-lib does
 * with plainLayoutFontkit). A word longer than the width is broken between characters.
 */
export function wrapText(text: string, font: TextMeasure, size: number, width: number): string[] {
  const lines: string[] = []
  const space = font.widthOfTextAtSize(' ', size)
  for (const paragraph of text.split(/\r\n|\r|\n/)) {
    let line = ''
    let lineWidth = 0
    for (const word of paragraph.split(/[ \t]+/)) {
      if (word === '') continue
      let wordWidth = font.widthOfTextAtSize(word, size)
      let rest = word
      if (wordWidth > width) {
        if (line) lines.push(line)
        const pieces = breakWord(rest, font, size, width)
        rest = pieces.pop() ?? ''
        lines.push(...pieces)
        line = ''
        lineWidth = 0
        wordWidth = font.widthOfTextAtSize(rest, size)
      }
      if (line && lineWidth + space + wordWidth <= width) {
        line += ` ${rest}`
        lineWidth += space + wordWidth
      } else {
        if (line) lines.push(line)
        line = rest
        lineWidth = wordWidth
      }
    }
    lines.push(line)
  }
  while (lines.length > 1 && lines[lines.length - 1] === '') lines.pop()
  return lines
}

function breakWord(word: string, font: TextMeasure, size: number, width: number): string[] {
  const pieces: string[] = []
  let piece = ''
  for (const ch of word) {
    if (piece && font.widthOfTextAtSize(piece + ch, size) > width) {
      pieces.push(piece)
      piece = ch
    } else {
      piece += ch
    }
  }
  pieces.push(piece)
  return pieces
}

// ---------------------------------------------------------------------------------------------
// Layout: a cursor that moves down the page and starts a new page before crossing the bottom.

interface TextStyle {
  font?: PDFFont
  size?: number
  color?: RGB
}

class Writer {
  readonly pages: PDFPage[] = []
  page!: PDFPage
  /** Top of the space still free on the page; text is set below it. */
  y = TOP
  /** Called after each new page's compact header, e.g. to repeat an item's column headings. */
  onContinue: (() => void) | null = null

  constructor(
    readonly doc: PDFDocument,
    readonly regular: PDFFont,
    readonly bold: PDFFont,
    readonly characters: ReadonlySet<number>,
    private readonly continuationTitle: { left: string; right: string },
  ) {}

  clean(text: string): string {
    return drawable(text, this.characters)
  }

  /** Cleans and wraps; paragraphs are kept. */
  wrap(text: string, width: number, style: TextStyle = {}): string[] {
    const font = style.font ?? this.regular
    const size = style.size ?? 10
    return text.split(/\r\n|\r|\n/).flatMap((paragraph) => wrapText(this.clean(paragraph), font, size, width))
  }

  firstPage(): void {
    this.page = this.doc.addPage([PAGE_WIDTH, PAGE_HEIGHT])
    this.pages.push(this.page)
    this.y = TOP
  }

  newPage(): void {
    this.firstPage()
    const { left, right } = this.continuationTitle
    this.draw(left, LEFT, this.y - 9, { font: this.bold, size: 9, color: SLATE })
    this.drawRight(right, RIGHT, this.y - 9, { size: 9, color: GREY })
    this.y -= 15
    this.rule(SLATE, 0.75)
    this.y -= 12
    this.onContinue?.()
  }

  /** Makes sure `height` points fit above the bottom margin, starting a new page if not. */
  ensure(height: number): void {
    if (this.y - height < BOTTOM) this.newPage()
  }

  /** Every string drawn or measured goes through clean(), so a missing glyph can never reach pdf-lib. */
  draw(text: string, x: number, baseline: number, style: TextStyle = {}): void {
    if (text === '') return
    this.page.drawText(this.clean(text), {
      x,
      y: baseline,
      font: style.font ?? this.regular,
      size: style.size ?? 10,
      color: style.color ?? INK,
    })
  }

  drawRight(text: string, right: number, baseline: number, style: TextStyle = {}): void {
    this.draw(text, right - this.width(text, style), baseline, style)
  }

  width(text: string, style: TextStyle = {}): number {
    return (style.font ?? this.regular).widthOfTextAtSize(this.clean(text), style.size ?? 10)
  }

  rule(color: RGB = RULE, thickness = 0.5, from = LEFT, to = RIGHT): void {
    this.page.drawLine({ start: { x: from, y: this.y }, end: { x: to, y: this.y }, thickness, color })
  }

  /** Wrapped text from the cursor down, each line moving to a new page when needed. */
  paragraph(text: string, x: number, width: number, style: TextStyle = {}, leading = 1.35): void {
    const size = style.size ?? 10
    for (const line of this.wrap(text, width, style)) {
      this.ensure(size * leading)
      this.draw(line, x, this.y - size, style)
      this.y -= size * leading
    }
  }
}

// ---------------------------------------------------------------------------------------------

const KIND_WORDS = { labour: 'Labour', part: 'Part', fee: 'Fee' } as const

/** Renders one sent version of an estimate, with the customer's decision and deposit when there are any. */
export async function renderEstimatePdf(input: EstimatePdfInput): Promise<Uint8Array> {
  const { snapshot, result, sentAt, timezone, hash } = input
  const decision = input.decision ?? null
  const deposit = input.deposit ?? null
  const files = await loadFontFiles()

  const doc = await PDFDocument.create({ updateMetadata: false })
  doc.registerFontkit(plainLayoutFontkit)
  // Fixed names instead of pdf-lib's random suffix keep the same input producing the same bytes.
  const regular = await doc.embedFont(files.regular, { subset: true, customName: 'Lato-Regular' })
  const bold = await doc.embedFont(files.bold, { subset: true, customName: 'Lato-Bold' })

  const title = `Estimate ${snapshot.reference} · version ${snapshot.version}`
  // Document properties are stored as UTF-16 text, not drawn, so they keep every character.
  doc.setTitle(`${title} — ${snapshot.workshop.name}`)
  doc.setAuthor(snapshot.workshop.name)
  doc.setSubject(`${snapshot.vehicle.registration} for ${snapshot.customer.name}`)
  doc.setCreator('Tickover')
  doc.setProducer('Tickover (pdf-lib)')
  doc.setCreationDate(new Date(sentAt))
  doc.setModificationDate(new Date(latest([sentAt, decision?.confirmedAt, deposit?.paidAt])))

  const w = new Writer(doc, regular, bold, files.characters, {
    left: snapshot.workshop.name,
    right: `${title} (continued)`,
  })
  w.firstPage()

  drawHeader(w, snapshot, sentAt, timezone, title)
  drawParties(w, snapshot)
  if (snapshot.message.trim() !== '') drawMessage(w, snapshot.message)

  const itemsById = new Map(snapshot.items.map((i) => [i.id, i]))
  w.y -= 6
  sectionHeading(w, decision ? 'Items and decisions' : 'Items')
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

  drawFooters(w, `${snapshot.reference} · version ${snapshot.version} · ${snapshot.workshop.name}`)
  return doc.save({ useObjectStreams: true })
}

function latest(times: (string | null | undefined)[]): string {
  return times.filter((t): t is string => typeof t === 'string').reduce((a, b) => (Date.parse(b) > Date.parse(a) ? b : a))
}

function drawHeader(w: Writer, s: EstimateSnapshot, sentAt: string, timezone: string, title: string): void {
  const leftWidth = 260
  let leftY = w.y
  for (const line of w.wrap(s.workshop.name, leftWidth, { font: w.bold, size: 16 })) {
    w.draw(line, LEFT, leftY - 16, { font: w.bold, size: 16, color: SLATE })
    leftY -= 20
  }
  leftY -= 2
  const contact = [
    ...s.workshop.addressLines,
    s.workshop.postcode,
    s.workshop.phone ? `Phone ${s.workshop.phone}` : null,
    s.workshop.email ? `E-mail ${s.workshop.email}` : null,
    s.workshop.vatNumber ? `VAT number ${s.workshop.vatNumber}` : null,
  ].filter((l): l is string => typeof l === 'string' && l.trim() !== '')
  for (const text of contact) {
    for (const line of w.wrap(text, leftWidth, { size: 9 })) {
      w.draw(line, LEFT, leftY - 9, { size: 9, color: GREY })
      leftY -= 12
    }
  }

  const rightWidth = RIGHT - LEFT - leftWidth - 20
  let rightY = w.y
  for (const line of w.wrap(title, rightWidth, { font: w.bold, size: 14 })) {
    w.drawRight(line, RIGHT, rightY - 14, { font: w.bold, size: 14, color: SLATE })
    rightY -= 18
  }
  rightY -= 2
  for (const text of [`Sent ${longDate(sentAt, timezone)}`, `Valid until ${calendarDate(s.expiresOn)}`]) {
    w.drawRight(text, RIGHT, rightY - 10, { size: 10 })
    rightY -= 14
  }

  w.y = Math.min(leftY, rightY) - 8
  w.rule(COPPER, 1.5)
  w.y -= 14
}

function drawParties(w: Writer, s: EstimateSnapshot): void {
  const columnWidth = (RIGHT - LEFT - 20) / 2
  const vehicleX = LEFT + columnWidth + 20
  const customer = [s.customer.name, s.customer.email].filter((l): l is string => !!l)
  const vehicle = [
    s.vehicle.registration,
    [s.vehicle.make, s.vehicle.model, s.vehicle.year === null ? '' : String(s.vehicle.year)].filter((p) => p.trim() !== '').join(' '),
    s.vehicle.vin ? `VIN ${s.vehicle.vin}` : null,
  ].filter((l): l is string => !!l && l.trim() !== '')

  const column = (label: string, lines: string[], x: number): number => {
    let y = w.y
    w.draw(label, x, y - 8, { font: w.bold, size: 8, color: COPPER })
    y -= 13
    lines.forEach((text, i) => {
      const style = { font: i === 0 ? w.bold : w.regular, size: 10 }
      for (const line of w.wrap(text, columnWidth, style)) {
        w.draw(line, x, y - 10, style)
        y -= 13.5
      }
    })
    return y
  }
  const bottom = Math.min(column('CUSTOMER', customer, LEFT), column('VEHICLE', vehicle, vehicleX))
  w.y = bottom - 10
}

function drawMessage(w: Writer, message: string): void {
  w.ensure(40)
  w.draw('MESSAGE FROM THE WORKSHOP', LEFT, w.y - 8, { font: w.bold, size: 8, color: COPPER })
  w.y -= 13
  w.paragraph(message, LEFT, RIGHT - LEFT, { size: 10 })
  w.y -= 8
}

function sectionHeading(w: Writer, text: string): void {
  w.ensure(40)
  w.draw(text, LEFT, w.y - 12, { font: w.bold, size: 12, color: SLATE })
  w.y -= 18
}

function decisionWord(item: SnapshotItem, decision: PdfDecisionRecord | null): { text: string; color: RGB } | null {
  if (!decision) return null
  const d = decision.decisions[item.id]
  if (d === 'approved') return { text: 'Approved', color: APPROVED_COLOUR }
  if (d === 'declined') return { text: 'Declined', color: DECLINED_COLOUR }
  return { text: 'Not decided', color: GREY }
}

function columnHeadings(w: Writer, taxMode: EstimateResult['taxMode']): void {
  const style = { size: 7.5, color: GREY }
  const baseline = w.y - 7.5
  w.draw('Kind', COL_KIND, baseline, style)
  w.draw('Description', COL_DESCRIPTION, baseline, style)
  w.draw('Quantity × price', COL_DETAIL, baseline, style)
  w.drawRight('VAT', COL_TAX_RIGHT, baseline, style)
  w.drawRight(taxMode === 'exclusive' ? 'Amount excl. VAT' : 'Amount incl. VAT', COL_AMOUNT_RIGHT, baseline, style)
  w.y -= 10
  w.rule(RULE, 0.5, ITEM_INDENT)
  w.y -= 3
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
  columnHeadings(w, result.taxMode)
  w.onContinue = () => {
    const style = { font: w.bold, size: 9, color: SLATE }
    const heading = w.wrap(`Item ${item.number} (continued): ${item.title}`, RIGHT - ITEM_INDENT - 12, style)
    w.draw(`${heading[0] ?? ''}${heading.length > 1 ? ' …' : ''}`, ITEM_INDENT, w.y - 9, style)
    w.y -= 14
    columnHeadings(w, result.taxMode)
  }

  priced.lines.forEach((line, j) => {
    const source = item.lines[j]
    if (!source) throw new Error(`The result has more lines than item ${item.number}`)
    // The last line keeps the item total company, so a total never starts a page alone.
    drawLine(w, line, source, currency, j === priced.lines.length - 1 ? ITEM_TOTAL_HEIGHT : 0)
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

function drawLine(w: Writer, line: ItemLineResult, source: SnapshotItem['lines'][number], currency: string, keepWith: number): void {
  const size = 9.5
  const leading = 12.5
  const description = w.wrap(line.description || KIND_WORDS[line.kind], DESCRIPTION_WIDTH, { size })
  const detail = w.wrap(lineDetail(source, currency), DETAIL_WIDTH, { size })
  let note: string[] = []
  if (line.note) {
    const saving = line.sharedSaving > 0 ? ` — saves ${formatMoney(line.sharedSaving, currency)} (${line.sharedHours} h)` : ''
    note = w.wrap(`Shared access: ${line.note}${saving}`, COL_TAX_RIGHT - COL_DESCRIPTION, { size: 8.5 })
  }
  const rows = Math.max(description.length, detail.length)
  w.ensure(rows * leading + note.length * 11 + 2 + keepWith)

  const baseline = w.y - size
  w.draw(KIND_WORDS[line.kind], COL_KIND, baseline, { size: 8.5, color: GREY })
  description.forEach((text, k) => w.draw(text, COL_DESCRIPTION, baseline - k * leading, { size }))
  detail.forEach((text, k) => w.draw(text, COL_DETAIL, baseline - k * leading, { size }))
  w.drawRight(`${line.taxRate}%`, COL_TAX_RIGHT, baseline, { size })
  w.drawRight(formatMoney(line.amount, currency), COL_AMOUNT_RIGHT, baseline, { size })
  w.y -= rows * leading
  for (const text of note) {
    w.draw(text, COL_DESCRIPTION, w.y - 8.5, { size: 8.5, color: COPPER })
    w.y -= 11
  }
  w.y -= 2
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
  type Row = { label: string; value: string; strong?: boolean; color?: RGB; ruleAbove?: boolean }
  const rows: Row[] = [
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
  const labelWidth = 250
  const labelX = RIGHT - 120 - labelWidth
  const wrapped = rows.map((row) => ({
    row,
    lines: w.wrap(row.label, labelWidth, { font: row.strong ? w.bold : w.regular, size: row.strong ? 10.5 : 9.5 }),
  }))
  const height = 18 + introLines.length * 12 + wrapped.reduce((sum, r) => sum + r.lines.length * 14 + (r.row.ruleAbove ? 5 : 0), 0) + 16

  w.y -= 8
  w.ensure(height)
  sectionHeading(w, decided ? 'Totals — approved work' : 'Totals — all items as proposed')
  for (const text of introLines) {
    w.draw(text, LEFT, w.y - 9, { size: 9, color: GREY })
    w.y -= 12
  }
  w.y -= 4
  for (const { row, lines } of wrapped) {
    const style = { font: row.strong ? w.bold : w.regular, size: row.strong ? 10.5 : 9.5, color: row.color ?? (row.strong ? SLATE : INK) }
    if (row.ruleAbove) {
      w.y -= 2
      w.rule(row.strong ? SLATE : RULE, row.strong ? 1 : 0.5, labelX)
      w.y -= 3
    }
    lines.forEach((text, k) => w.draw(text, labelX, w.y - style.size - k * 14, style))
    w.drawRight(row.value, RIGHT, w.y - style.size, style)
    w.y -= lines.length * 14
  }
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
  sectionHeading(w, "Customer's decision")
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

function drawFooters(w: Writer, reference: string): void {
  const total = w.pages.length
  w.pages.forEach((page, i) => {
    page.drawLine({ start: { x: LEFT, y: FOOTER_BASELINE + 12 }, end: { x: RIGHT, y: FOOTER_BASELINE + 12 }, thickness: 0.5, color: RULE })
    const style = { font: w.regular, size: 8, color: GREY }
    const pageText = `Page ${i + 1} of ${total}`
    const pageWidth = w.regular.widthOfTextAtSize(pageText, 8)
    const refLines = wrapText(w.clean(reference), w.regular, 8, RIGHT - LEFT - pageWidth - 20)
    page.drawText(refLines[0] ?? '', { x: LEFT, y: FOOTER_BASELINE, ...style })
    page.drawText(pageText, { x: RIGHT - pageWidth, y: FOOTER_BASELINE, ...style })
  })
}
