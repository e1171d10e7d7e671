import type { z } from 'zod'
import { ValidationError } from '../../lib/errors'
import type { ImportIssue, ImportReport, ImportRow } from '../../../shared/schemas/catalogue'
import { MAX_IMPORT_ROWS } from '../../../shared/schemas/catalogue'
import { type CsvColumn, readCsv } from './catalogue.csv'

/** One importable table: its CSV columns and how a row becomes the same input the forms send. */
export interface ImportTable<Input> {
  columns: readonly CsvColumn[]
  /** The column rows are matched on: a code or a part number. */
  keyColumn: string
  /** Which CSV column each input field comes from, so a schema issue names the column. */
  fieldColumns: Record<string, string>
  schema: z.ZodType<Input>
  /** Problems the schema cannot name well, such as money written in major units; checked first. */
  cellIssues?(cells: Record<string, string>): { column: string; message: string }[]
  /** The cells as the schema's input; the schema does the checking. */
  candidate(cells: Record<string, string>): unknown
  key(input: Input): string
  /** The record as canonical cell text: equal cells mean nothing changed. */
  cells(input: Input): Record<string, string>
}

export interface PlannedRow<Input> {
  row: number
  input: Input
  action: ImportRow['action']
  changed: string[]
}

export interface ImportPlan<Input> {
  rows: PlannedRow<Input>[]
  errors: ImportIssue[]
}

/**
 * Reads and checks every row against the schema and the stored records, and says what would be
 * added, changed or left. Nothing is written here. `check` adds the rules that need every row at
 * once (a loop of access steps, book time against access time).
 */
export function planImport<Input>(
  table: ImportTable<Input>,
  text: string,
  existing: ReadonlyMap<string, Input>,
  check?: (rows: PlannedRow<Input>[]) => ImportIssue[],
): ImportPlan<Input> {
  const { records, errors } = readCsv(text, table.columns)
  if (records.length > MAX_IMPORT_ROWS) {
    return {
      rows: [],
      errors: [
        { row: 1, column: null, message: `The file has ${records.length} rows; at most ${MAX_IMPORT_ROWS} can be imported at once.` },
      ],
    }
  }
  const rows: PlannedRow<Input>[] = []
  const seen = new Map<string, number>()
  for (const record of records) {
    const cellIssues = table.cellIssues?.(record.cells) ?? []
    if (cellIssues.length > 0) {
      errors.push(...cellIssues.map((i) => ({ row: record.row, ...i })))
      continue
    }
    const parsed = table.schema.safeParse(table.candidate(record.cells))
    if (!parsed.success) {
      for (const issue of parsed.error.issues) {
        const field = String(issue.path[0] ?? '')
        errors.push({ row: record.row, column: table.fieldColumns[field] ?? null, message: issue.message })
      }
      continue
    }
    const input = parsed.data
    const key = table.key(input)
    const earlier = seen.get(key)
    if (earlier !== undefined) {
      errors.push({ row: record.row, column: table.keyColumn, message: `"${key}" is already on row ${earlier}.` })
      continue
    }
    seen.set(key, record.row)
    const stored = existing.get(key)
    if (!stored) {
      rows.push({ row: record.row, input, action: 'add', changed: [] })
      continue
    }
    const before = table.cells(stored)
    const after = table.cells(input)
    const changed = table.columns.map((c) => c.name).filter((c) => before[c] !== after[c])
    rows.push({ row: record.row, input, action: changed.length > 0 ? 'change' : 'keep', changed })
  }
  if (check) errors.push(...check(rows))
  errors.sort((a, b) => a.row - b.row)
  return { rows, errors }
}

export function reportOf<Input>(plan: ImportPlan<Input>, table: ImportTable<Input>, committed: boolean): ImportReport {
  const count = (action: ImportRow['action']) => plan.rows.filter((r) => r.action === action).length
  return {
    rows: plan.rows.map((r) => ({ row: r.row, key: table.key(r.input), action: r.action, changed: r.changed })),
    errors: plan.errors,
    summary: { added: count('add'), changed: count('change'), unchanged: count('keep') },
    committed,
  }
}

/** The commit found problems: nothing is written, and each issue's path is [row, column]. */
export function refuseImport(errors: ImportIssue[]): never {
  throw new ValidationError(
    'The file has problems, so nothing was imported. Correct the rows listed and try again.',
    errors.map((e) => ({ path: [e.row, e.column ?? ''], message: e.message })),
    'import_has_errors',
  )
}
