import { type ErrorIssue, ValidationError } from '../../lib/errors'
import { accessHours, findLoop } from '../../../shared/catalogue/access-graph'
import { normalizeDecimal, toHundredths } from '../../../shared/decimal'
import type { AccessStepInput, LabourOperationInput } from '../../../shared/schemas/catalogue'
import type { OperationRecord, OperationValues, StepWithIncludes } from './labour.repo'

/**
 * The rules the labour table keeps, as pure functions of the access-step graph: an operation names
 * known steps, steps do not include each other in a loop, and book time covers access time.
 */
export interface GraphStep {
  id: string
  code: string
  name: string
  hours: string
  includes: string[]
}
export type Graph = Map<string, GraphStep>

/** An operation as the access-time rule sees it. */
export interface BookedOperation {
  code: string
  bookHours: string
  steps: string[]
}

export const graphOf = (steps: StepWithIncludes[]): Graph =>
  new Map(
    steps.map((s) => [
      s.row.code,
      { id: s.row.id, code: s.row.code, name: s.row.name, hours: normalizeDecimal(s.row.hours), includes: s.includes },
    ]),
  )

/** The stored operation as the form and the import would send it. */
export const inputOf = (row: OperationRecord, stepCodes: string[]): LabourOperationInput => ({
  code: row.code,
  name: row.name,
  synonyms: row.synonyms,
  system: row.system,
  vehicleGroups: row.vehicleGroups,
  side: row.side,
  bookHours: normalizeDecimal(row.bookHours),
  category: row.category,
  accessSteps: stepCodes,
  notes: row.notes,
})

export const valuesOf = (input: LabourOperationInput): OperationValues => ({
  code: input.code,
  name: input.name,
  synonyms: input.synonyms,
  system: input.system,
  vehicleGroups: input.vehicleGroups,
  side: input.side,
  bookHours: input.bookHours,
  category: input.category,
  notes: input.notes ?? null,
})

/** Book time includes access time, so access may not take longer than the whole operation. */
function bookTimeIssue(bookHours: string, stepCodes: string[], graph: Graph): string | null {
  const access = accessHours(stepCodes, graph)
  if (toHundredths(access) <= toHundredths(bookHours)) return null
  return `The access steps take ${access} h, more than the book time of ${normalizeDecimal(bookHours)} h (book time includes access).`
}

export function operationIssues(input: LabourOperationInput, graph: Graph): { field: string; message: string }[] {
  const unknown = input.accessSteps.filter((c) => !graph.has(c))
  if (unknown.length > 0)
    return [
      {
        field: 'accessSteps',
        message: `No access step with the code ${unknown.map((c) => `"${c}"`).join(', ')}. Add it under Access steps first.`,
      },
    ]
  const duplicate = input.accessSteps.find((c, i) => input.accessSteps.indexOf(c) !== i)
  if (duplicate) return [{ field: 'accessSteps', message: `"${duplicate}" is listed twice.` }]
  const tooLong = bookTimeIssue(input.bookHours, input.accessSteps, graph)
  return tooLong ? [{ field: 'bookHours', message: tooLong }] : []
}

const loopMessage = (loop: string[]) => `Access steps cannot include each other in a loop: ${loop.join(' → ')}.`

const withoutStep = (graph: Graph, code: string): Graph => {
  const copy = new Map(graph)
  const step = copy.get(code)
  if (step) copy.set(code, { ...step, hours: '0' })
  return copy
}

/**
 * The graph after `changes`, checked: includes name known steps, no loops, and every operation
 * still books at least its access time. Issues carry the code of the step they belong to.
 */
export function stepGraphIssues(graph: Graph, changes: AccessStepInput[], operations: BookedOperation[]) {
  const next: Graph = new Map(graph)
  for (const c of changes)
    next.set(c.code, { id: graph.get(c.code)?.id ?? '', code: c.code, name: c.name, hours: c.hours, includes: c.includes })
  const issues: { code: string; field: 'includes' | 'hours'; message: string }[] = []
  for (const c of changes) {
    const unknown = c.includes.filter((code) => !next.has(code))
    if (unknown.length > 0)
      issues.push({ code: c.code, field: 'includes', message: `No access step with the code ${unknown.map((u) => `"${u}"`).join(', ')}.` })
    if (c.includes.includes(c.code)) issues.push({ code: c.code, field: 'includes', message: 'A step cannot include itself.' })
  }
  if (issues.length > 0) return issues
  const loop = findLoop([...next.values()])
  if (loop) {
    const changed = new Set(changes.map((c) => c.code))
    const owner = loop.find((code) => changed.has(code)) ?? loop[0] ?? ''
    // Told from the step being changed: "WHEEL → HUB → WHEEL" when WHEEL was just told to include HUB.
    const start = loop.indexOf(owner)
    const fromOwner = [...loop.slice(start, -1), ...loop.slice(0, start), owner]
    return [{ code: owner, field: 'includes' as const, message: loopMessage(fromOwner) }]
  }
  const changedCodes = new Set(changes.map((c) => c.code))
  for (const op of operations) {
    const problem = bookTimeIssue(op.bookHours, op.steps, next)
    if (!problem) continue
    // Charged to a changed step the operation reaches, so the owner sees which change causes it.
    const culprit = [...changedCodes].find((code) => accessHours(op.steps, next) !== accessHours(op.steps, withoutStep(next, code)))
    issues.push({
      code: culprit ?? changes[0]?.code ?? '',
      field: 'hours',
      message: `Operation ${op.code} would book less than its access time: ${problem}`,
    })
  }
  return issues
}

/** A form's input broke the rules: each issue names the body field it belongs to. */
export function refuseInput(issues: { field: string; message: string }[]): void {
  if (issues.length === 0) return
  const bodyIssues: ErrorIssue[] = issues.map((i) => ({ path: ['body', i.field], message: i.message }))
  throw new ValidationError('Some of the details are not right. Please check the highlighted fields.', bodyIssues)
}
