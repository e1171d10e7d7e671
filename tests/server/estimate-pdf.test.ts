/**
 * The estimate PDF, read back with pdfjs (a separate PDF reader): figures, words, pages, fonts.
 * Needs no database; the demo estimate below is invented.
 */
import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs'
import { PDFDict, PDFDocument, PDFName } from 'pdf-lib'
import { beforeAll, describe, expect, it } from 'vitest'
import { wrapText } from '../../server/lib/pdf/text'
import { renderEstimatePdf, type PdfDecisionRecord, type PdfDeposit } from '../../server/modules/estimates/estimate-pdf'
import { calculateEstimate } from '../../shared/estimate'
import { formatMoney } from '../../shared/money'
import { snapshotToEngineInput, type EstimateSnapshot, type SnapshotItem } from '../../shared/schemas/estimates'
import type { Severity } from '../../shared/schemas/severity'

const HASH = 'a3f1c9e07b52d48e6f0a1b2c3d4e5f60718293a4b5c6d7e8f90a1b2c3d4e5f6'
const SEVERITIES: Severity[] = ['urgent', 'soon', 'watch', 'ok']
const TITLES = [
  'Replace front left CV joint',
  'Refill front differential with fresh oil',
  'Renew rear prop shaft universal joint',
  'Reseal front left swivel housing',
  'Adjust rear differential backlash',
  'Replace transfer box output bearing',
]
const NOTE =
  'The seal is weeping onto the brake disc and the lubricant is low. Left as it is, water and dirt get in past the seal and the bearing wears quickly; we would renew the seal, clean the housing and refill it with the right grade.'

function uuid(n: number): string {
  return `00000000-0000-4000-8000-${String(n).padStart(12, '0')}`
}

/** An invented estimate; every third item needs the front left hub off, so those after the first share it. */
function demoSnapshot(itemCount: number, oddTitle?: string): EstimateSnapshot {
  const items: SnapshotItem[] = Array.from({ length: itemCount }, (_, i) => {
    const hub = i % 3 === 0
    return {
      id: `item-${i + 1}`,
      number: i + 1,
      title: i === 4 && oddTitle ? oddTitle : `${TITLES[i % TITLES.length]} (finding ${i + 1})`,
      severity: SEVERITIES[i % SEVERITIES.length]!,
      customerNote: i % 2 === 0 ? NOTE : '',
      explanation:
        i % 5 === 0
          ? { what: 'Worn joint', why: 'A worn joint can break and stop the car.', ifLeft: 'Loss of drive on that wheel.' }
          : null,
      measurement: i % 4 === 1 ? `Backlash ${40 + i}° at the prop flange` : null,
      photoIds: [],
      requires: [],
      lines: [
        {
          kind: 'labour' as const,
          id: `l${i}a`,
          description: hub ? 'Strip hub and replace joint' : 'Labour to carry out the repair as described, including road test',
          hours: hub ? '3.4' : `${(i % 7) + 1}.5`,
          rate: 8950,
          taxRate: '20',
          accessSteps: hub ? ['hub-off-fl'] : [],
          operationCode: null,
          category: null,
        },
        {
          kind: 'part' as const,
          id: `l${i}b`,
          description: `Seal kit, part ${1000 + i}`,
          quantity: i % 2 ? '2' : '1',
          unitPrice: 2499 + i * 37,
          taxRate: '20',
          partNumber: null,
        },
        { kind: 'fee' as const, id: `l${i}c`, description: 'Waste oil disposal', amount: 350, taxRate: '0' },
      ],
    }
  })
  return {
    format: 1,
    estimateId: uuid(1),
    number: 42,
    reference: 'E-0042',
    version: 2,
    expiresOn: '2026-12-16',
    currency: 'GBP',
    workshop: {
      name: 'Ridgeway Four by Four',
      addressLines: ['Unit 4, Quarry Lane Trading Estate', 'Little Hadley'],
      postcode: 'HD9 4QX',
      phone: '01632 960123',
      email: 'desk@ridgeway4x4.example',
      vatNumber: 'GB123456789',
    },
    customer: { id: uuid(2), name: 'Alex Demo-Customer', email: 'alex@example.com' },
    vehicle: { registration: 'AB12 CDE', make: 'Land Rover', model: 'Defender 110', year: 2012, vin: 'SALLDHMF7CA000001' },
    message: 'Thanks for bringing the vehicle in. We found a few things on the ramp; the urgent ones first. Call us with any questions.',
    items,
    accessSteps: [
      { code: 'wheel-off-fl', hours: '0.3', includes: [], label: 'front left wheel off' },
      { code: 'hub-off-fl', hours: '1.2', includes: ['wheel-off-fl'], label: 'front left hub off' },
    ],
    taxMode: 'exclusive',
    taxRounding: 'per-line',
    discount: { kind: 'percent', value: '5' },
    deposit: { kind: 'percent', value: '25' },
  }
}

interface PageText {
  text: string
  items: { str: string; x: number; y: number; width: number }[]
}

async function readPdf(bytes: Uint8Array): Promise<PageText[]> {
  // pdfjs takes ownership of the buffer it is given, so it gets a copy.
  const pdf = await getDocument({ data: bytes.slice(), useSystemFonts: false, isEvalSupported: false }).promise
  const pages: PageText[] = []
  for (let n = 1; n <= pdf.numPages; n++) {
    const content = await (await pdf.getPage(n)).getTextContent()
    const items = content.items
      .filter((i) => 'str' in i)
      .map((i) => ({ str: i.str, x: i.transform[4] as number, y: i.transform[5] as number, width: i.width }))
    pages.push({
      text: items
        .map((i) => i.str)
        .join(' ')
        .replace(/\s+/g, ' '),
      items,
    })
  }
  await pdf.destroy()
  return pages
}

const allText = (pages: PageText[]) => pages.map((p) => p.text).join(' ')

describe('estimate PDF', () => {
  const snapshot = demoSnapshot(60)
  const result = calculateEstimate(snapshotToEngineInput(snapshot))
  // The 60-item proposal is rendered and read once for the two tests that look at it. In a hook,
  // because pdfjs's first document also loads its worker code, which is slow on a busy machine.
  let proposal: { bytes: Uint8Array; pages: PageText[] }
  beforeAll(async () => {
    const bytes = await renderEstimatePdf({ snapshot, result, sentAt: '2026-12-02T10:15:00Z', timezone: 'Europe/London', hash: HASH })
    proposal = { bytes, pages: await readPdf(bytes) }
  })

  it('lays out a long proposed estimate over several numbered pages with the engine figures', async () => {
    const { bytes, pages } = proposal

    expect(new TextDecoder().decode(bytes.slice(0, 5))).toBe('%PDF-')
    expect(pages.length).toBeGreaterThan(1)
    pages.forEach((page, i) => expect(page.text).toContain(`Page ${i + 1} of ${pages.length}`))
    pages.forEach((page) => expect(page.text).toContain('E-0042 · version 2'))
    pages.slice(1).forEach((page) => expect(page.text).toContain('Ridgeway Four by Four Estimate E-0042 · version 2 (continued)'))

    const text = allText(pages)
    expect(text).toContain('Estimate E-0042 · version 2')
    expect(text).toContain('Ridgeway Four by Four')
    expect(text).toContain('VAT number GB123456789')
    expect(text).toContain('Sent 2 December 2026')
    expect(text).toContain('Valid until 16 December 2026')
    expect(text).toContain('AB12 CDE')
    expect(text).toContain('Land Rover Defender 110 2012')
    expect(text).toContain('VIN SALLDHMF7CA000001')
    expect(text).toContain('Alex Demo-Customer')
    for (const item of snapshot.items) expect(text).toContain(item.title)
    expect(text).toContain('Fix now — safety')
    expect(text).toContain('Keep an eye on')
    expect(text).toContain('Backlash 41° at the prop flange')

    // Proposed scope: every item, and no decision words.
    const p = result.proposed
    expect(p.gross).toBeGreaterThan(0)
    expect(text).toContain('Total if every item is approved')
    expect(text).toContain(formatMoney(p.gross, 'GBP'))
    expect(text).toContain(formatMoney(p.net, 'GBP'))
    expect(p.taxByRate.map((r) => r.rate)).toEqual(['0', '20'])
    for (const r of p.taxByRate) {
      expect(text).toContain(`VAT ${r.rate}% on net ${formatMoney(r.net, 'GBP')}`)
      expect(text).toContain(formatMoney(r.tax, 'GBP'))
    }
    expect(p.deposit).toBeGreaterThan(0)
    expect(text).toMatch(new RegExp(`Deposit due ${escape(formatMoney(p.deposit, 'GBP'))}`))
    expect(p.sharedSaving).toBeGreaterThan(0)
    expect(text).toContain(formatMoney(p.sharedSaving, 'GBP'))
    expect(text).toContain('The customer decides on each item')
    expect(text).not.toContain('Approved')
    expect(text).not.toContain('Declined')

    expect(text).toContain(HASH)
  })

  it('keeps every piece of text inside the margins, with only the footer below the bottom margin', async () => {
    const { pages } = proposal
    expect(pages.length).toBeGreaterThan(1)
    for (const page of pages) {
      for (const item of page.items.filter((i) => i.str.trim() !== '')) {
        expect(item.x).toBeGreaterThanOrEqual(49.9)
        expect(item.x + item.width).toBeLessThanOrEqual(595.28 - 49.9)
        expect(item.y).toBeLessThanOrEqual(841.89 - 48)
        if (item.y < 40) {
          expect(item.str).toMatch(/^(Page \d+ of \d+|E-0042 · version 2 · Ridgeway Four by Four)$/)
        } else {
          // Nothing but the footer goes below the bottom margin (62 pt); baselines sit on or above it.
          expect(item.y).toBeGreaterThanOrEqual(62)
        }
        // Right-aligned text ends on the margin, so the widths used for layout are the drawn ones.
        if (/^Page \d+ of \d+$/.test(item.str)) expect(item.x + item.width).toBeCloseTo(595.28 - 50, 1)
      }
    }
  })

  it('shows the approved scope, each decision and the decision record when the customer has confirmed', async () => {
    const decisions: PdfDecisionRecord['decisions'] = {}
    snapshot.items.forEach((item, i) => (decisions[item.id] = i % 4 === 2 ? 'declined' : 'approved'))
    const decided = calculateEstimate(snapshotToEngineInput(snapshot, decisions))
    const decision: PdfDecisionRecord = {
      confirmedAt: '2026-12-02T14:03:27Z',
      decisions,
      consents: { startWithinCancellationPeriod: true, cancellationInformationShown: true },
      versionHash: HASH,
      ip: '203.0.113.7',
      userAgent: 'Mozilla/5.0 (Linux; Android 14; Pixel 8) AppleWebKit/537.36 (KHTML, like Gecko) Chrome/131.0.0.0 Mobile Safari/537.36',
    }
    const deposit: PdfDeposit = {
      amountMinor: decided.approved.deposit,
      status: 'paid',
      paidAt: '2026-12-02T14:03:55Z',
      refundedMinor: null,
    }
    const pages = await readPdf(
      await renderEstimatePdf({
        snapshot,
        result: decided,
        sentAt: '2026-12-02T10:15:00Z',
        timezone: 'Europe/London',
        decision,
        deposit,
        hash: HASH,
      }),
    )
    const text = allText(pages)

    const a = decided.approved
    expect(a.gross).toBeLessThan(decided.proposed.gross)
    expect(text).toContain('Total for approved work')
    expect(text).toMatch(new RegExp(`Total for approved work ${escape(formatMoney(a.gross, 'GBP'))}`))
    expect(text).not.toContain(formatMoney(decided.proposed.gross, 'GBP'))
    for (const r of a.taxByRate) expect(text).toContain(`VAT ${r.rate}% on net ${formatMoney(r.net, 'GBP')} ${formatMoney(r.tax, 'GBP')}`)
    expect(text).toContain(`Deposit due ${formatMoney(a.deposit, 'GBP')}`)
    // London is on GMT (UTC+0) in December (common practice).
    expect(text).toContain(`Deposit paid 2 Dec 2026 14:03 (${formatMoney(a.deposit, 'GBP')})`)

    expect(text).toContain('3 Declined Renew rear prop shaft universal joint (finding 3)')
    expect(text).toContain('4 Approved Reseal front left swivel housing (finding 4)')
    // With item 1 approved, a later hub item is priced without the hub work, and says so.
    const later = decided.items[3]!.lines[0]!
    expect(later.note).toContain('already done for item 1')
    expect(text).toContain(`${later.note} — saves ${formatMoney(later.sharedSaving, 'GBP')}`)
    expect(text).toContain('Approved')
    expect(text.match(/Declined/g)?.length).toBe(15)
    expect(text).toContain('Items approved: 45 of 60; declined: 15')
    expect(text).toContain('Confirmed 2 December 2026 at 14:03 GMT (Europe/London)')
    expect(text).toContain('Asked for work to start within the 14-day cancellation period: yes')
    expect(text).toContain('Shown the cancellation information: yes')
    expect(text).toContain('IP address: 203.0.113.7')
    expect(text).toContain('Pixel 8')
    expect(text).toContain(HASH)
  })

  it('shows dates in the workshop time zone', async () => {
    const small = demoSnapshot(1)
    const priced = calculateEstimate(snapshotToEngineInput(small))
    // 23:30 UTC on 1 December is 08:30 on 2 December in Tokyo (UTC+9, no daylight saving; from memory).
    const text = allText(
      await readPdf(
        await renderEstimatePdf({ snapshot: small, result: priced, sentAt: '2026-12-01T23:30:00Z', timezone: 'Asia/Tokyo', hash: HASH }),
      ),
    )
    expect(text).toContain('Sent 2 December 2026')
    expect(text).toContain('Page 1 of 1')
  })

  it('words the deposit as awaiting payment or refunded', async () => {
    const small = demoSnapshot(1)
    const decisions = { 'item-1': 'approved' as const }
    const priced = calculateEstimate(snapshotToEngineInput(small, decisions))
    const decision: PdfDecisionRecord = {
      confirmedAt: '2026-07-01T09:00:00Z',
      decisions,
      consents: { startWithinCancellationPeriod: false, cancellationInformationShown: true },
      versionHash: HASH,
      ip: null,
      userAgent: null,
    }
    const render = async (deposit: PdfDeposit) =>
      allText(
        await readPdf(
          await renderEstimatePdf({
            snapshot: small,
            result: priced,
            sentAt: '2026-07-01T08:00:00Z',
            timezone: 'Europe/London',
            decision,
            deposit,
            hash: HASH,
          }),
        ),
      )
    const amount = formatMoney(priced.approved.deposit, 'GBP')

    const awaiting = await render({ amountMinor: priced.approved.deposit, status: 'awaiting_payment', paidAt: null, refundedMinor: null })
    expect(awaiting).toContain(`Deposit of ${amount} awaiting payment`)
    expect(awaiting).toContain('Asked for work to start within the 14-day cancellation period: no')
    expect(awaiting).toContain('IP address: not recorded')
    // London keeps British Summer Time (UTC+1) in July (common practice).
    expect(awaiting).toContain('Confirmed 1 July 2026 at 10:00 BST (Europe/London)')

    const refunded = await render({
      amountMinor: priced.approved.deposit,
      status: 'refunded',
      paidAt: '2026-07-01T09:05:00Z',
      refundedMinor: 1000,
    })
    expect(refunded).toContain(`Deposit of ${amount} paid 1 Jul 2026 10:05, ${formatMoney(1000, 'GBP')} refunded`)
  })

  it('gives the same bytes for the same input, and refuses a result priced with other decisions', async () => {
    const small = demoSnapshot(2)
    const decisions = { 'item-1': 'approved' as const, 'item-2': 'declined' as const }
    const decision: PdfDecisionRecord = {
      confirmedAt: '2026-12-02T14:03:27Z',
      decisions,
      consents: { startWithinCancellationPeriod: true, cancellationInformationShown: true },
      versionHash: HASH,
      ip: null,
      userAgent: null,
    }
    const input = {
      snapshot: small,
      result: calculateEstimate(snapshotToEngineInput(small, decisions)),
      sentAt: '2026-12-02T10:15:00Z',
      timezone: 'Europe/London',
      decision,
      hash: HASH,
    }
    expect(Buffer.from(await renderEstimatePdf(input)).equals(Buffer.from(await renderEstimatePdf(input)))).toBe(true)

    const undecided = calculateEstimate(snapshotToEngineInput(small))
    await expect(renderEstimatePdf({ ...input, result: undecided })).rejects.toThrow(/another decision for item 1/)
  })

  it('draws characters Lato lacks as "?" instead of failing', async () => {
    const odd = demoSnapshot(6, 'Checked ✓ 检查 axle')
    odd.customer.name = 'Zoë Łukasiewicz'
    const priced = calculateEstimate(snapshotToEngineInput(odd))
    const text = allText(
      await readPdf(
        await renderEstimatePdf({ snapshot: odd, result: priced, sentAt: '2026-12-02T10:15:00Z', timezone: 'Europe/London', hash: HASH }),
      ),
    )
    expect(text).toContain('Checked ? ?? axle')
    expect(text).toContain('Zoë ?ukasiewicz')
  })

  it('embeds both Lato weights in the file', async () => {
    const small = demoSnapshot(3)
    const bytes = await renderEstimatePdf({
      snapshot: small,
      result: calculateEstimate(snapshotToEngineInput(small)),
      sentAt: '2026-12-02T10:15:00Z',
      timezone: 'Europe/London',
      hash: HASH,
    })
    const doc = await PDFDocument.load(bytes)
    const embedded: string[] = []
    for (const [, object] of doc.context.enumerateIndirectObjects()) {
      if (!(object instanceof PDFDict) || object.get(PDFName.of('Type')) !== PDFName.of('FontDescriptor')) continue
      const name = object.get(PDFName.of('FontName'))
      if (object.has(PDFName.of('FontFile2')) || object.has(PDFName.of('FontFile3'))) embedded.push(String(name))
    }
    expect(embedded.sort()).toEqual(['/Lato-Bold', '/Lato-Regular'])
  })

  it('wraps long text within the width and breaks words longer than a line', async () => {
    const doc = await PDFDocument.create()
    const font = await doc.embedFont('Helvetica')
    const lines = wrapText('one two three four five six seven eight nine ten', font, 10, 60)
    expect(lines.length).toBeGreaterThan(2)
    expect(lines.join(' ')).toBe('one two three four five six seven eight nine ten')
    for (const line of lines) expect(font.widthOfTextAtSize(line, 10)).toBeLessThanOrEqual(60)
    const long = wrapText('x'.repeat(80), font, 10, 60)
    expect(long.join('')).toBe('x'.repeat(80))
    for (const line of long) expect(font.widthOfTextAtSize(line, 10)).toBeLessThanOrEqual(60)
    expect(wrapText('first\nsecond', font, 10, 200)).toEqual(['first', 'second'])
  })
})

function escape(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')
}
