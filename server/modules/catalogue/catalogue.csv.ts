import { CsvError, parse } from 'csv-parse/sync'
import type { ImportIssue } from '../../../shared/schemas/catalogue'

export interface CsvColumn {
  name: string
  required: boolean
}

export interface CsvRecord {
  /** As a spreadsheet numbers it: the header is row 1. */
  row: number
  cells: Record<string, string>
}

/** Lists inside one cell ("UJ|cross and bearing"). */
export const LIST_SEPARATOR = '|'

export function splitList(cell: string): string[] {
  return cell
    .split(LIST_SEPARATOR)
    .map((v) => v.trim())
    .filter(Boolean)
}

export const joinList = (values: readonly string[]) => values.join(LIST_SEPARATOR)

/**
 * Reads a CSV file with a header row. Column names are matched without regard to case or
 * surrounding spaces and may come in any order. A spreadsheet saved with semicolons (usual where
 * the comma is the decimal sign) is read as well. Blank rows are skipped but still counted, so
 * row numbers match the spreadsheet's.
 */
export function readCsv(text: string, columns: readonly CsvColumn[]): { records: CsvRecord[]; errors: ImportIssue[] } {
  const firstLine = text.slice(0, text.search(/\r?\n|$/))
  const delimiter = firstLine.includes(';') && !firstLine.includes(',') ? ';' : ','
  let raw: string[][]
  try {
    raw = parse(text, { bom: true, delimiter, relax_column_count: true, skip_empty_lines: false }) as string[][]
  } catch (err) {
    if (!(err instanceof CsvError)) throw err
    const line = typeof err.lines === 'number' ? err.lines : 1
    return {
      records: [],
      errors: [
        { row: line, column: null, message: `The file cannot be read as CSV around line ${line}: check for an unclosed quote mark.` },
      ],
    }
  }

  const [header = [], ...body] = raw
  const names = header.map((h) => h.trim().toLowerCase())
  const known = new Set(columns.map((c) => c.name))
  const errors: ImportIssue[] = []
  names.forEach((name, i) => {
    if (!known.has(name))
      errors.push({
        row: 1,
        column: name || `column ${i + 1}`,
        message: `Unknown column. The columns are: ${columns.map((c) => c.name).join(', ')}.`,
      })
    else if (names.indexOf(name) !== i) errors.push({ row: 1, column: name, message: 'This column appears twice.' })
  })
  for (const c of columns) {
    if (c.required && !names.includes(c.name))
      errors.push({ row: 1, column: c.name, message: 'This column is missing from the header row.' })
  }
  if (errors.length > 0) return { records: [], errors }

  const records: CsvRecord[] = []
  body.forEach((cells, i) => {
    const row = i + 2
    if (cells.every((c) => c.trim() === '')) return
    if (cells.length > names.length) {
      errors.push({
        row,
        column: null,
        message: `This row has ${cells.length} cells but the header has ${names.length}. A cell with a comma in it needs quote marks around it.`,
      })
      return
    }
    records.push({ row, cells: Object.fromEntries(names.map((name, k) => [name, (cells[k] ?? '').trim()])) })
  })
  return { records, errors }
}

/** RFC 4180: comma-separated, CRLF line ends, quotes around any cell with a comma, quote or line break. */
export function writeCsv(columns: readonly string[], rows: readonly Record<string, string>[]): string {
  const cell = (v: string) => (/[",\r\n]/.test(v) || v !== v.trim() ? `"${v.replace(/"/g, '""')}"` : v)
  const lines = [columns.join(','), ...rows.map((r) => columns.map((c) => cell(r[c] ?? '')).join(','))]
  return `${lines.join('\r\n')}\r\n`
}

/**
 * Spreadsheets run a cell that starts with = + - @ as a formula (OWASP: CSV injection). Exported
 * text cells that start so get an apostrophe, which spreadsheets hide; the import takes it off again.
 */
const formulaStart = /^[=+\-@\t\r]/
export const guardText = (v: string) => (formulaStart.test(v) ? `'${v}` : v)
export const unguardText = (v: string) => (v.startsWith("'") && formulaStart.test(v.slice(1)) ? v.slice(1) : v)
