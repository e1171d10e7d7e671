/**
 * Tables of money: lines in columns (a description that wraps, amounts right-aligned on their
 * column's right edge) and label/amount rows such as a document's totals.
 */
import type { RGB } from 'pdf-lib'
import { GREY, INK, RIGHT, RULE, SLATE } from './layout'
import type { TextStyle, Writer } from './writer'

export interface Column {
  heading: string
  /** The column's left edge; for a right-aligned column, its right edge. */
  x: number
  align?: 'left' | 'right'
  /** Cells wrap at this width; a column without one is drawn on one line. */
  wrapWidth?: number
  /** How this column's cells differ from the table's text (e.g. smaller and grey). */
  style?: TextStyle
}

/** Text under a row's cells, such as a note on the line; it is wrapped and kept on the row's page. */
export interface RowNote {
  text: string
  x: number
  width: number
  size: number
  leading: number
  color?: RGB
}

export class Table {
  constructor(
    private readonly w: Writer,
    private readonly columns: Column[],
    /** The cells' text size and the distance between their lines. */
    private readonly text: { size: number; leading: number },
  ) {}

  /** The columns' headings and a rule under them from the first column to the right margin. */
  headings(): void {
    const w = this.w
    const style = { size: 7.5, color: GREY }
    const baseline = w.y - 7.5
    for (const column of this.columns) {
      if (column.align === 'right') w.drawRight(column.heading, column.x, baseline, style)
      else w.draw(column.heading, column.x, baseline, style)
    }
    w.y -= 10
    w.rule(RULE, 0.5, this.columns[0]?.x)
    w.y -= 3
  }

  /**
   * One row, a cell per column, starting a new page first when it does not fit. `keepWith` more
   * points must fit under it on the same page (so a total never starts a page alone).
   */
  row(cells: string[], options: { note?: RowNote; keepWith?: number } = {}): void {
    const w = this.w
    const { size, leading } = this.text
    const styleOf = (column: Column) => ({ size, ...column.style })
    const wrapped = this.columns.map((column, i) => {
      const text = cells[i] ?? ''
      return column.wrapWidth === undefined ? [text] : w.wrap(text, column.wrapWidth, styleOf(column))
    })
    const note = options.note
    const noteLines = note ? w.wrap(note.text, note.width, { size: note.size }) : []
    const rows = Math.max(...wrapped.map((lines) => lines.length))
    w.ensure(rows * leading + noteLines.length * (note?.leading ?? 0) + 2 + (options.keepWith ?? 0))

    const baseline = w.y - size
    this.columns.forEach((column, i) => {
      const style = styleOf(column)
      wrapped[i]!.forEach((text, k) => {
        if (column.align === 'right') w.drawRight(text, column.x, baseline - k * leading, style)
        else w.draw(text, column.x, baseline - k * leading, style)
      })
    })
    w.y -= rows * leading
    if (note) {
      for (const text of noteLines) {
        w.draw(text, note.x, w.y - note.size, { size: note.size, color: note.color ?? INK })
        w.y -= note.leading
      }
    }
    w.y -= 2
  }
}

/** A row of a totals block: a label that wraps, and an amount on the right margin. */
export interface AmountRow {
  label: string
  value: string
  /** Bold and larger, in slate: a total the reader looks for. */
  strong?: boolean
  color?: RGB
  /** A rule between this row and the one before (slate and heavier above a strong row). */
  ruleAbove?: boolean
}

/**
 * Label/amount rows with the labels in a column `labelWidth` wide ending 120 pt before the right
 * margin. Laid out first so the caller can keep the whole block on one page: `height` is what
 * draw() moves the cursor down by.
 */
export function amountRows(w: Writer, rows: AmountRow[], labelWidth = 250): { height: number; draw(): void } {
  const labelX = RIGHT - 120 - labelWidth
  const styleOf = (row: AmountRow) => ({
    font: row.strong ? w.bold : w.regular,
    size: row.strong ? 10.5 : 9.5,
    color: row.color ?? (row.strong ? SLATE : INK),
  })
  const wrapped = rows.map((row) => ({ row, lines: w.wrap(row.label, labelWidth, styleOf(row)) }))
  const height = wrapped.reduce((sum, r) => sum + r.lines.length * 14 + (r.row.ruleAbove ? 5 : 0), 0)
  return {
    height,
    draw() {
      for (const { row, lines } of wrapped) {
        const style = styleOf(row)
        if (row.ruleAbove) {
          w.y -= 2
          w.rule(row.strong ? SLATE : RULE, row.strong ? 1 : 0.5, labelX)
          w.y -= 3
        }
        lines.forEach((text, k) => w.draw(text, labelX, w.y - style.size - k * 14, style))
        w.drawRight(row.value, RIGHT, w.y - style.size, style)
        w.y -= lines.length * 14
      }
    },
  }
}
