/**
 * Turns a shape-valid estimate into the engine's working model, or explains why it cannot:
 * unknown or looping access steps, items that require unapproved items, access time longer
 * than the book time. Every problem comes back with the path of the field to fix.
 */
import { defaultMinimumCharge, minorUnitExponent, multiplyRounded } from '../money'
import { type Decision, type EstimateInput, EstimateInputShapeSchema, type SharedStep } from './contract'
import { formatScaled, HOURS_PLACES, parseScaled, PERCENT_PLACES, QUANTITY_PLACES } from '../decimal'

export interface InputIssue {
  path: (string | number)[]
  message: string
}

export interface PreparedStep {
  code: string
  label: string
  /** Own hours in hundredths. */
  hours: number
  hoursText: string
}

/** What one line costs in one scope once shared access is taken off. */
export interface LinePrice {
  amount: bigint
  /** Hours already charged on an earlier line, as a decimal string. */
  sharedHours: string
  saving: bigint
  shared: SharedStep[]
}

export interface PreparedLine {
  kind: 'labour' | 'part' | 'fee'
  description: string
  /** Position of the line within its item. */
  index: number
  /** Tax rate in hundredths of a percent (20% → 2000n). */
  taxRate: bigint
  /** The rate as the shortest decimal string, so "20" and "20.0" are one rate. */
  taxKey: string
  /** Price with nothing shared: rate × hours, unit price × quantity, or the fee. */
  fullAmount: bigint
  /** Labour only: minor units per hour. */
  rate: bigint
  /** Labour only: book hours in hundredths. */
  hours: number
  /** Labour only: indices of every access step the line needs, following `includes`. */
  steps: readonly number[]
  /** The line's price when nothing is shared, made once and reused by every scope. */
  unshared: LinePrice
}

export interface PreparedItem {
  id: string
  title: string
  /** 1-based position, the number people use ("item 2"). */
  number: number
  decision: Decision
  lines: PreparedLine[]
}

export interface PreparedEstimate {
  currency: string
  exponent: number
  taxMode: EstimateInput['taxMode']
  taxRounding: EstimateInput['taxRounding']
  steps: PreparedStep[]
  items: PreparedItem[]
  discount: { kind: 'percent'; value: bigint } | { kind: 'amount'; value: bigint } | null
  deposit: { kind: 'none' } | { kind: 'percent'; value: bigint } | { kind: 'fixed'; value: bigint } | { kind: 'parts' }
  minimumCharge: bigint
}

export type Prepared = { ok: true; value: PreparedEstimate } | { ok: false; issues: InputIssue[] }

/**
 * The full contract: shape plus the rules that tie parts together (step graph, requirements, access
 * time), for callers that validate without pricing (the server's validate() middleware).
 */
export const EstimateInputSchema = EstimateInputShapeSchema.superRefine(
  (input, ctx) => {
    const prepared = prepareEstimate(input)
    if (prepared.ok) return
    for (const issue of prepared.issues) ctx.addIssue({ code: 'custom', path: issue.path, message: issue.message })
  },
  // The rules read parsed values, so they wait until the shape itself is right.
  { when: (payload) => payload.issues.length === 0 },
)

/** Upper limits far above real work: they catch typos and keep totals within exact JSON numbers. */
const MAX_HOURS = parseScaled('10000', HOURS_PLACES)
const MAX_QUANTITY = parseScaled('1000000', QUANTITY_PLACES)
const MAX_PERCENT = parseScaled('100', PERCENT_PLACES)

/** The path is built only for a failure: this runs for every line of every estimate. */
function atMost(value: bigint, max: bigint, places: number, what: string, path: () => InputIssue['path'], issues: InputIssue[]): bigint {
  if (value > max) issues.push({ path: path(), message: `${what} must be at most ${formatScaled(max, places)}` })
  return value
}

function linePath(item: number, line: number, ...rest: (string | number)[]): InputIssue['path'] {
  return ['items', item, 'lines', line, ...rest]
}

export function prepareEstimate(input: EstimateInput): Prepared {
  const issues: InputIssue[] = []
  const steps = input.accessSteps.map((s, i): PreparedStep => {
    const hours = atMost(parseScaled(s.hours, HOURS_PLACES), MAX_HOURS, HOURS_PLACES, 'Hours', () => ['accessSteps', i, 'hours'], issues)
    return { code: s.code, label: s.label ?? s.code, hours: Number(hours), hoursText: formatScaled(hours, HOURS_PLACES) }
  })
  // Estimates repeat a handful of tax rates across many lines; each is parsed and named once.
  const taxRates = new Map<string, { rate: bigint; key: string }>()
  const stepIndex = indexSteps(input, issues)
  const closures = issues.length === 0 ? stepClosures(input, stepIndex, issues) : null
  checkItems(input, issues)

  // A per-line marker avoids building a Set for every labour line when merging step closures.
  const mark = new Int32Array(steps.length).fill(-1)
  let markGeneration = 0
  const items: PreparedItem[] = input.items.map((item, i) => ({
    id: item.id,
    title: item.title,
    number: i + 1,
    decision: item.decision,
    lines: item.lines.map((line, j): PreparedLine => {
      let known = taxRates.get(line.taxRate)
      if (!known) {
        const rate = parseScaled(line.taxRate, PERCENT_PLACES)
        known = { rate, key: formatScaled(rate, PERCENT_PLACES) }
        taxRates.set(line.taxRate, known)
      }
      const { rate: taxRate, key: taxKey } = known
      atMost(taxRate, MAX_PERCENT, PERCENT_PLACES, 'Tax rate', () => linePath(i, j, 'taxRate'), issues)
      // Every line is built with the same fields in the same order; object spreads here made
      // each line a slow, differently shaped object and cost more than the arithmetic.
      if (line.kind === 'part') {
        const quantity = atMost(
          parseScaled(line.quantity, QUANTITY_PLACES),
          MAX_QUANTITY,
          QUANTITY_PLACES,
          'Quantity',
          () => linePath(i, j, 'quantity'),
          issues,
        )
        const fullAmount = multiplyRounded(BigInt(line.unitPrice), quantity, QUANTITY_PLACES, 'half-up')
        return preparedLine('part', line.description, j, taxRate, taxKey, fullAmount, 0n, 0, [])
      }
      if (line.kind === 'fee') return preparedLine('fee', line.description, j, taxRate, taxKey, BigInt(line.amount), 0n, 0, [])

      const hours = Number(
        atMost(parseScaled(line.hours, HOURS_PLACES), MAX_HOURS, HOURS_PLACES, 'Hours', () => linePath(i, j, 'hours'), issues),
      )
      const rate = BigInt(line.rate)
      const fullAmount = multiplyRounded(rate, BigInt(hours), HOURS_PLACES, 'half-up')
      const lineSteps: number[] = []
      markGeneration++
      line.accessSteps.forEach((code, k) => {
        const s = stepIndex.get(code)
        if (s === undefined) {
          issues.push({ path: linePath(i, j, 'accessSteps', k), message: `Unknown access step "${code}"` })
          return
        }
        for (const t of closures?.[s] ?? []) {
          if (mark[t] === markGeneration) continue
          mark[t] = markGeneration
          lineSteps.push(t)
        }
      })
      if (closures) {
        const access = lineSteps.reduce((sum, t) => sum + (steps[t] as PreparedStep).hours, 0)
        if (access > hours) {
          issues.push({
            path: linePath(i, j, 'hours'),
            message: `The access steps take ${formatScaled(access, HOURS_PLACES)} h, more than the line's book time of ${line.hours} h (book time includes access)`,
          })
        }
      }
      return preparedLine('labour', line.description, j, taxRate, taxKey, fullAmount, rate, hours, lineSteps)
    }),
  }))

  const discount = input.discount
  const deposit = input.deposit
  const discountPercent =
    discount?.kind === 'percent'
      ? atMost(parseScaled(discount.value, PERCENT_PLACES), MAX_PERCENT, PERCENT_PLACES, 'Percentage', () => ['discount', 'value'], issues)
      : 0n
  const depositPercent =
    deposit.kind === 'percent'
      ? atMost(parseScaled(deposit.value, PERCENT_PLACES), MAX_PERCENT, PERCENT_PLACES, 'Percentage', () => ['deposit', 'value'], issues)
      : 0n
  if (issues.length > 0) return { ok: false, issues }

  return {
    ok: true,
    value: {
      currency: input.currency,
      exponent: minorUnitExponent(input.currency),
      taxMode: input.taxMode,
      taxRounding: input.taxRounding,
      steps,
      items,
      discount:
        discount === null
          ? null
          : discount.kind === 'percent'
            ? { kind: 'percent', value: discountPercent }
            : { kind: 'amount', value: BigInt(discount.value) },
      deposit:
        deposit.kind === 'percent'
          ? { kind: 'percent', value: depositPercent }
          : deposit.kind === 'fixed'
            ? { kind: 'fixed', value: BigInt(deposit.value) }
            : deposit,
      minimumCharge: BigInt(input.minimumCharge ?? defaultMinimumCharge(input.currency)),
    },
  }
}

function preparedLine(
  kind: PreparedLine['kind'],
  description: string,
  index: number,
  taxRate: bigint,
  taxKey: string,
  fullAmount: bigint,
  rate: bigint,
  hours: number,
  steps: number[],
): PreparedLine {
  return {
    kind,
    description,
    index,
    taxRate,
    taxKey,
    fullAmount,
    rate,
    hours,
    steps,
    unshared: { amount: fullAmount, sharedHours: '0', saving: 0n, shared: [] },
  }
}

function indexSteps(input: EstimateInput, issues: InputIssue[]): Map<string, number> {
  const index = new Map<string, number>()
  input.accessSteps.forEach((step, i) => {
    if (index.has(step.code)) issues.push({ path: ['accessSteps', i, 'code'], message: `Access step "${step.code}" is listed twice` })
    else index.set(step.code, i)
  })
  input.accessSteps.forEach((step, i) => {
    step.includes.forEach((code, k) => {
      if (!index.has(code))
        issues.push({ path: ['accessSteps', i, 'includes', k], message: `Access step "${step.code}" includes unknown step "${code}"` })
    })
  })
  return index
}

/**
 * Each step's closure (itself and everything it includes, transitively), or null with an issue
 * on every `includes` entry that closes a loop, since a loop has no finite access time.
 */
function stepClosures(input: EstimateInput, index: Map<string, number>, issues: InputIssue[]): number[][] | null {
  const n = input.accessSteps.length
  const state = new Uint8Array(n) // 0 unseen, 1 on the current path, 2 finished
  const closures: number[][] = new Array(n)
  const path: number[] = []
  const mark = new Int32Array(n).fill(-1)
  let looped = false

  const visit = (i: number): void => {
    state[i] = 1
    path.push(i)
    const step = input.accessSteps[i]!
    step.includes.forEach((code, k) => {
      const j = index.get(code)!
      if (state[j] === 1) {
        looped = true
        const loop = [...path.slice(path.indexOf(j)), j].map((t) => input.accessSteps[t]!.code)
        issues.push({ path: ['accessSteps', i, 'includes', k], message: `Access steps include each other in a loop: ${loop.join(' → ')}` })
      } else if (state[j] === 0) {
        visit(j)
      }
    })
    path.pop()
    state[i] = 2
    if (looped) return
    const closure = [i]
    mark[i] = i
    for (const code of step.includes) {
      for (const t of closures[index.get(code)!]!) {
        if (mark[t] === i) continue
        mark[t] = i
        closure.push(t)
      }
    }
    closures[i] = closure
  }
  for (let i = 0; i < n; i++) if (state[i] === 0) visit(i)
  return looped ? null : closures
}

function describe(item: { id: string; title: string }, number: number): string {
  return `item ${number} "${item.title}" (${item.id})`
}

function checkItems(input: EstimateInput, issues: InputIssue[]): void {
  const byId = new Map<string, number>()
  input.items.forEach((item, i) => {
    if (byId.has(item.id)) issues.push({ path: ['items', i, 'id'], message: `Item id "${item.id}" is used twice` })
    else byId.set(item.id, i)
  })
  input.items.forEach((item, i) => {
    item.requires.forEach((id, k) => {
      const path = ['items', i, 'requires', k]
      const r = byId.get(id)
      if (r === undefined) {
        issues.push({ path, message: `${describe(item, i + 1)} requires unknown item "${id}"` })
      } else if (r === i) {
        issues.push({ path, message: `${describe(item, i + 1)} cannot require itself` })
      } else {
        const required = input.items[r]!
        if (item.decision === 'approved' && required.decision !== 'approved') {
          issues.push({
            path,
            message: `${describe(item, i + 1)} is approved but requires ${describe(required, r + 1)}, which is ${required.decision}`,
          })
        }
      }
    })
  })
}
