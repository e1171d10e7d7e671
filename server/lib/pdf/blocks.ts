/** The blocks at the top of a workshop's document: its letterhead, and labelled columns (customer, vehicle). */
import { COPPER, GREY, LEFT, RIGHT, SLATE } from './layout'
import type { Writer } from './writer'

/** The workshop as its documents print it. */
export interface WorkshopDetails {
  name: string
  addressLines: string[]
  postcode: string | null
  phone: string | null
  email: string | null
  vatNumber: string | null
}

/**
 * The first page's top: the workshop's name and contact details on the left, the document's title
 * and a few facts ("Sent 2 December 2026") on the right, and a copper rule under both.
 */
export function drawLetterhead(w: Writer, workshop: WorkshopDetails, title: string, facts: string[]): void {
  const leftWidth = 260
  let leftY = w.y
  for (const line of w.wrap(workshop.name, leftWidth, { font: w.bold, size: 16 })) {
    w.draw(line, LEFT, leftY - 16, { font: w.bold, size: 16, color: SLATE })
    leftY -= 20
  }
  leftY -= 2
  const contact = [
    ...workshop.addressLines,
    workshop.postcode,
    workshop.phone ? `Phone ${workshop.phone}` : null,
    workshop.email ? `E-mail ${workshop.email}` : null,
    workshop.vatNumber ? `VAT number ${workshop.vatNumber}` : null,
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
  for (const text of facts) {
    w.drawRight(text, RIGHT, rightY - 10, { size: 10 })
    rightY -= 14
  }

  w.y = Math.min(leftY, rightY) - 8
  w.rule(COPPER, 1.5)
  w.y -= 14
}

/** A small capitals label ("CUSTOMER") whose top is at `top`; the block under it starts LABEL_HEIGHT lower. */
export function drawLabel(w: Writer, text: string, x: number, top: number): void {
  w.draw(text, x, top - 8, { font: w.bold, size: 8, color: COPPER })
}

export const LABEL_HEIGHT = 13

export interface LabelledLines {
  label: string
  /** The first line is bold (a name, a registration); each line wraps within the column. */
  lines: string[]
}

/** Columns of equal width side by side across the page, 20 pt apart; the cursor ends under the longest. */
export function drawLabelledColumns(w: Writer, columns: LabelledLines[]): void {
  const gap = 20
  const columnWidth = (RIGHT - LEFT - gap * (columns.length - 1)) / columns.length
  let x = LEFT
  let bottom = w.y
  for (const { label, lines } of columns) {
    let y = w.y
    drawLabel(w, label, x, y)
    y -= LABEL_HEIGHT
    lines.forEach((text, i) => {
      const style = { font: i === 0 ? w.bold : w.regular, size: 10 }
      for (const line of w.wrap(text, columnWidth, style)) {
        w.draw(line, x, y - 10, style)
        y -= 13.5
      }
    })
    bottom = Math.min(bottom, y)
    x = x + columnWidth + gap
  }
  w.y = bottom - 10
}
