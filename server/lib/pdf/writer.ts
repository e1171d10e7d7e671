/**
 * A document drawn top to bottom: a cursor that moves down the page, starts a new page (with a
 * compact continuation header) before crossing the bottom margin, and numbers the pages at the end.
 */
import { PDFDocument, type PDFFont, type PDFPage, type RGB } from 'pdf-lib'
import { embedFonts, type PdfFonts } from './fonts'
import { BOTTOM, FOOTER_BASELINE, GREY, INK, LEFT, PAGE_HEIGHT, PAGE_WIDTH, RIGHT, RULE, SLATE, TOP } from './layout'
import { drawable, wrapText } from './text'

/** Defaults: the regular weight, 10 pt, ink. */
export interface TextStyle {
  font?: PDFFont
  size?: number
  color?: RGB
}

/** The document's properties (File → Properties in a reader); stored as UTF-16 text, not drawn, so they keep every character. */
export interface DocumentProperties {
  title: string
  author: string
  subject: string
  createdAt: Date
  modifiedAt: Date
}

/** Shown at the top of every page after the first: bold on the left, grey on the right. */
export interface ContinuationTitle {
  left: string
  right: string
}

/** A new A4 document with Lato embedded, its properties set and the first page started. */
export async function startDocument(properties: DocumentProperties, continuationTitle: ContinuationTitle): Promise<Writer> {
  const doc = await PDFDocument.create({ updateMetadata: false })
  const fonts = await embedFonts(doc)
  doc.setTitle(properties.title)
  doc.setAuthor(properties.author)
  doc.setSubject(properties.subject)
  doc.setCreator('Tickover')
  doc.setProducer('Tickover (pdf-lib)')
  doc.setCreationDate(properties.createdAt)
  doc.setModificationDate(properties.modifiedAt)
  return new Writer(doc, fonts, continuationTitle)
}

export class Writer {
  readonly pages: PDFPage[] = []
  page!: PDFPage
  /** Top of the space still free on the page; text is set below it. */
  y = TOP
  /** Called after each new page's compact header, e.g. to repeat a table's column headings. */
  onContinue: (() => void) | null = null
  readonly regular: PDFFont
  readonly bold: PDFFont

  constructor(
    readonly doc: PDFDocument,
    private readonly fonts: PdfFonts,
    private readonly continuationTitle: ContinuationTitle,
  ) {
    this.regular = fonts.regular
    this.bold = fonts.bold
    this.addPage()
  }

  /** What the fonts cannot draw becomes '?'; control characters become spaces. */
  clean(text: string): string {
    return drawable(text, this.fonts.characters)
  }

  /** Cleans and wraps; paragraphs are kept. */
  wrap(text: string, width: number, style: TextStyle = {}): string[] {
    const font = style.font ?? this.regular
    const size = style.size ?? 10
    return text.split(/\r\n|\r|\n/).flatMap((paragraph) => wrapText(this.clean(paragraph), font, size, width))
  }

  private addPage(): void {
    this.page = this.doc.addPage([PAGE_WIDTH, PAGE_HEIGHT])
    this.pages.push(this.page)
    this.y = TOP
  }

  newPage(): void {
    this.addPage()
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

  /** Text that ends at `right`. */
  drawRight(text: string, right: number, baseline: number, style: TextStyle = {}): void {
    this.draw(text, right - this.width(text, style), baseline, style)
  }

  width(text: string, style: TextStyle = {}): number {
    return (style.font ?? this.regular).widthOfTextAtSize(this.clean(text), style.size ?? 10)
  }

  /** A horizontal line at the cursor. */
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

  /** A section's heading, kept with at least the section's first lines. */
  sectionHeading(text: string): void {
    this.ensure(40)
    this.draw(text, LEFT, this.y - 12, { font: this.bold, size: 12, color: SLATE })
    this.y -= 18
  }

  /** Puts `reference` and "Page n of N" at the foot of every page, and returns the file's bytes. */
  async finish(reference: string): Promise<Uint8Array> {
    const total = this.pages.length
    this.pages.forEach((page, i) => {
      page.drawLine({
        start: { x: LEFT, y: FOOTER_BASELINE + 12 },
        end: { x: RIGHT, y: FOOTER_BASELINE + 12 },
        thickness: 0.5,
        color: RULE,
      })
      const style = { font: this.regular, size: 8, color: GREY }
      const pageText = `Page ${i + 1} of ${total}`
      const pageWidth = this.regular.widthOfTextAtSize(pageText, 8)
      const refLines = wrapText(this.clean(reference), this.regular, 8, RIGHT - LEFT - pageWidth - 20)
      page.drawText(refLines[0] ?? '', { x: LEFT, y: FOOTER_BASELINE, ...style })
      page.drawText(pageText, { x: RIGHT - pageWidth, y: FOOTER_BASELINE, ...style })
    })
    return this.doc.save({ useObjectStreams: true })
  }
}
