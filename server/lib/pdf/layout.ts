/**
 * The page every Tickover document is printed on: A4 portrait, in PDF points (1/72 inch), with the
 * margins and colours the estimate set and invoices and credit notes follow (DESIGN.md's brand
 * colours: slate for headings, copper for accents).
 */
import { rgb, type RGB } from 'pdf-lib'

export const PAGE_WIDTH = 595.28
export const PAGE_HEIGHT = 841.89
/** Left and right edges of the text. */
export const LEFT = 50
export const RIGHT = PAGE_WIDTH - 50
/** Where the first line of a page starts. */
export const TOP = PAGE_HEIGHT - 48
/** Nothing but the footer goes below this line. */
export const BOTTOM = 62
export const FOOTER_BASELINE = 34

/** A colour written as CSS hex ("#1F3A4D"), as DESIGN.md and shared/schemas give them. */
export function hex(colour: string): RGB {
  const n = Number.parseInt(colour.slice(1), 16)
  return rgb(((n >> 16) & 255) / 255, ((n >> 8) & 255) / 255, (n & 255) / 255)
}

export const SLATE = hex('#1F3A4D')
export const COPPER = hex('#C8642B')
/** Body text. */
export const INK = hex('#222222')
/** Secondary text: labels, notes, small print. */
export const GREY = hex('#5F6B73')
/** Thin lines between blocks. */
export const RULE = hex('#C9D1D6')
export const WHITE = rgb(1, 1, 1)
