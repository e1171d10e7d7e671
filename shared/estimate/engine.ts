import type { z } from 'zod'
import { allocateLargestRemainder, divideRounded, multiplyRounded, type Rounding } from '../money'
import {
  EstimateInputShapeSchema,
  type EstimateInputDraft,
  type EstimateResult,
  type ItemLineResult,
  type ItemResult,
  type ScopeLineResult,
  type ScopeResult,
  type SharedStep,
} from './contract'
import { formatScaled, HOURS_PLACES, PERCENT_PLACES } from '../decimal'
import { type InputIssue, type LinePrice, type PreparedEstimate, type PreparedItem, type PreparedLine, prepareEstimate } from './prepare'

export type EstimateIssue = z.core.$ZodIssue

export type SafeEstimateResult = { success: true; data: EstimateResult } | { success: false; issues: EstimateIssue[] }

/** Thrown by calculateEstimate; `issues` are zod issues with the path of each field to fix. */
export class EstimateInputError extends Error {
  readonly issues: EstimateIssue[]
  constructor(issues: EstimateIssue[]) {
    super(summarise(issues))
    this.name = 'EstimateInputError'
    this.issues = issues
  }
}

/** Prices an estimate, or throws EstimateInputError when the input breaks the contract. */
export function calculateEstimate(input: EstimateInputDraft): EstimateResult {
  const result = safeCalculateEstimate(input)
  if (!result.success) throw new EstimateInputError(result.issues)
  return result.data
}

/** Like calculateEstimate, but reports input errors as a value, in the shape of zod's safeParse. */
export function safeCalculateEstimate(input: unknown): SafeEstimateResult {
  const parsed = EstimateInputShapeSchema.safeParse(input)
  if (!parsed.success) return { success: false, issues: parsed.error.issues }
  const prepared = prepareEstimate(parsed.data)
  if (!prepared.ok) return { success: false, issues: prepared.issues.map(customIssue) }
  try {
    return { success: true, data: price(prepared.value) }
  } catch (error) {
    if (error instanceof AmountTooLargeError) {
      return { success: false, issues: [customIssue({ path: [], message: error.message })] }
    }
    throw error
  }
}

/** A message for a 422 body or an exception: the first problem, and how many more there are. */
export function summarise(issues: readonly EstimateIssue[]): string {
  const first = issues[0]
  if (!first) return 'The estimate is not valid.'
  const where = first.path.length > 0 ? ` (at ${first.path.map(String).join('.')})` : ''
  const more = issues.length > 1 ? ` And ${issues.length - 1} more problem${issues.length > 2 ? 's' : ''}.` : ''
  return `${first.message}${where}.${more}`
}

function customIssue(issue: InputIssue): EstimateIssue {
  return { code: 'custom', path: issue.path, message: issue.message }
}

class AmountTooLargeError extends Error {
  constructor() {
    super('The estimate adds up to more than can be represented exactly in minor units')
  }
}

const largestExact = BigInt(Number.MAX_SAFE_INTEGER)

/** Output money is a JSON number, so it must stay within the range where numbers are exact. */
function minor(value: bigint): number {
  if (value > largestExact) throw new AmountTooLargeError()
  return Number(value)
}

// ---------------------------------------------------------------------------------------------

type Scope = 'approved' | 'proposed'

function price(p: PreparedEstimate): EstimateResult {
  const asIfApproved = walk(p, 'approved')
  const everything = walk(p, 'proposed')

  const items = p.items.map((item) => itemResult(p, item, asIfApproved[item.number - 1]!))
  const approvedEntries: Entry[] = []
  const proposedEntries: Entry[] = []
  for (const item of p.items) {
    item.lines.forEach((line, j) => {
      if (item.decision === 'approved') approvedEntries.push({ item, line, price: asIfApproved[item.number - 1]![j]! })
      proposedEntries.push({ item, line, price: everything[item.number - 1]![j]! })
    })
  }
  return {
    currency: p.currency,
    exponent: p.exponent,
    taxMode: p.taxMode,
    taxRounding: p.taxRounding,
    minimumCharge: minor(p.minimumCharge),
    items,
    approved: scopeResult(p, approvedEntries),
    proposed: scopeResult(p, proposedEntries),
  }
}

/**
 * Prices every line for one scope by walking items, then lines, in order. A step's time is
 * charged to the first labour line of a counted item that needs it; later lines that need it
 * again are charged their book time less that step's own hours.
 *
 * In the approved scope only approved items count, but items that are not approved are still
 * priced as if approved: their own lines share with earlier approved items and with each other,
 * then their marks are taken back so later items see only what is really approved.
 */
function walk(p: PreparedEstimate, scope: Scope): LinePrice[][] {
  const coverItem = new Int32Array(p.steps.length).fill(-1)
  const coverLine = new Int32Array(p.steps.length).fill(-1)
  return p.items.map((item, i) => {
    const counts = scope === 'proposed' || item.decision === 'approved'
    const marked: number[] = []
    const prices = item.lines.map((line, j): LinePrice => {
      if (line.steps.length === 0) return line.unshared
      let sharedHours = 0
      let shared: SharedStep[] | null = null
      // A line's steps are distinct, so marking as we go cannot hide a step from this same line.
      for (const s of line.steps) {
        const by = coverItem[s]!
        if (by >= 0) {
          const step = p.steps[s]!
          sharedHours += step.hours
          shared ??= []
          shared.push({
            step: step.code,
            label: step.label,
            hours: step.hoursText,
            itemId: p.items[by]!.id,
            itemNumber: by + 1,
            line: coverLine[s]!,
          })
        } else {
          coverItem[s] = i
          coverLine[s] = j
          if (!counts) marked.push(s)
        }
      }
      if (!shared) return line.unshared
      const amount = multiplyRounded(line.rate, BigInt(line.hours - sharedHours), HOURS_PLACES, 'half-up')
      return { amount, sharedHours: formatScaled(sharedHours, HOURS_PLACES), saving: line.fullAmount - amount, shared }
    })
    for (const s of marked) {
      coverItem[s] = -1
      coverLine[s] = -1
    }
    return prices
  })
}

/** 100% in the scale tax rates are held in (hundredths of a percent). */
const HUNDRED_PERCENT = 100n * 10n ** BigInt(PERCENT_PLACES)

/** Tax on one amount: on top of a net amount, or the fraction inside a gross one (rate / (100 + rate), 1/6 at 20%). */
function taxOn(p: PreparedEstimate, amount: bigint, taxRate: bigint, rounding: Rounding): bigint {
  if (p.taxMode === 'exclusive') return divideRounded(amount * taxRate, HUNDRED_PERCENT, rounding)
  return divideRounded(amount * taxRate, HUNDRED_PERCENT + taxRate, rounding)
}

function netAndGross(p: PreparedEstimate, amount: bigint, tax: bigint): { net: bigint; gross: bigint } {
  return p.taxMode === 'exclusive' ? { net: amount, gross: amount + tax } : { net: amount - tax, gross: amount }
}

function itemResult(p: PreparedEstimate, item: PreparedItem, prices: LinePrice[]): ItemResult {
  let net = 0n
  let tax = 0n
  let gross = 0n
  let saving = 0n
  const lines = item.lines.map((line, j): ItemLineResult => {
    const linePrice = prices[j]!
    const lineTax = taxOn(p, linePrice.amount, line.taxRate, 'half-up')
    const figures = netAndGross(p, linePrice.amount, lineTax)
    net += figures.net
    tax += lineTax
    gross += figures.gross
    saving += linePrice.saving
    return {
      kind: line.kind,
      description: line.description,
      taxRate: line.taxKey,
      amount: minor(linePrice.amount),
      sharedHours: linePrice.sharedHours,
      sharedSaving: minor(linePrice.saving),
      shared: linePrice.shared,
      note: sharedNote(p, linePrice.shared),
      net: minor(figures.net),
      tax: minor(lineTax),
      gross: minor(figures.gross),
    }
  })
  return {
    id: item.id,
    number: item.number,
    title: item.title,
    decision: item.decision,
    lines,
    net: minor(net),
    tax: minor(tax),
    gross: minor(gross),
    sharedSaving: minor(saving),
  }
}

/** "hub off, wheel off already done for item 1 (Replace front left CV joint)" */
function sharedNote(p: PreparedEstimate, shared: SharedStep[]): string | null {
  if (shared.length === 0) return null
  const byItem = new Map<number, string[]>()
  for (const s of shared) {
    const labels = byItem.get(s.itemNumber) ?? []
    labels.push(s.label)
    byItem.set(s.itemNumber, labels)
  }
  return [...byItem]
    .map(([number, labels]) => `${labels.join(', ')} already done for item ${number} (${p.items[number - 1]!.title})`)
    .join('; ')
}

interface Entry {
  item: PreparedItem
  line: PreparedLine
  price: LinePrice
}

interface RateGroup {
  taxRate: bigint
  key: string
  amount: bigint
  lineTax: bigint
}

interface RateTotals {
  key: string
  taxRate: bigint
  net: bigint
  tax: bigint
  gross: bigint
}

/** Tax per rate over lines already net of their discount share, rounded the way the shop chose. */
function taxByRate(p: PreparedEstimate, groups: Map<string, RateGroup>): RateTotals[] {
  return [...groups.values()]
    .sort((a, b) => (a.taxRate < b.taxRate ? -1 : a.taxRate > b.taxRate ? 1 : 0))
    .map((g) => {
      const tax =
        p.taxRounding === 'per-line' ? g.lineTax : taxOn(p, g.amount, g.taxRate, p.taxRounding === 'per-invoice' ? 'half-up' : 'down')
      const { net, gross } = netAndGross(p, g.amount, tax)
      return { key: g.key, taxRate: g.taxRate, net, tax, gross }
    })
}

function addToGroup(groups: Map<string, RateGroup>, line: PreparedLine, amount: bigint, lineTax: bigint): void {
  const group = groups.get(line.taxKey)
  if (group) {
    group.amount += amount
    group.lineTax += lineTax
  } else {
    groups.set(line.taxKey, { taxRate: line.taxRate, key: line.taxKey, amount, lineTax })
  }
}

function scopeResult(p: PreparedEstimate, entries: Entry[]): ScopeResult {
  let labour = 0n
  let parts = 0n
  let fees = 0n
  let saving = 0n
  for (const { line, price: linePrice } of entries) {
    if (line.kind === 'labour') labour += linePrice.amount
    else if (line.kind === 'part') parts += linePrice.amount
    else fees += linePrice.amount
    saving += linePrice.saving
  }
  const subtotal = labour + parts + fees

  let discount = 0n
  if (p.discount?.kind === 'percent') discount = divideRounded(subtotal * p.discount.value, HUNDRED_PERCENT, 'half-up')
  else if (p.discount?.kind === 'amount') discount = p.discount.value < subtotal ? p.discount.value : subtotal
  const shares = allocateLargestRemainder(
    discount,
    entries.map((e) => e.price.amount),
  )

  const groups = new Map<string, RateGroup>()
  const partGroups = new Map<string, RateGroup>()
  const lines = entries.map(({ item, line, price: linePrice }, k): ScopeLineResult => {
    const share = shares[k]!
    const after = linePrice.amount - share
    const lineTax = taxOn(p, after, line.taxRate, 'half-up')
    addToGroup(groups, line, after, lineTax)
    if (line.kind === 'part') addToGroup(partGroups, line, after, lineTax)
    const figures = netAndGross(p, after, lineTax)
    return {
      itemId: item.id,
      line: line.index,
      kind: line.kind,
      taxRate: line.taxKey,
      amount: minor(linePrice.amount),
      sharedHours: linePrice.sharedHours,
      sharedSaving: minor(linePrice.saving),
      discount: minor(share),
      net: minor(figures.net),
      tax: minor(lineTax),
      gross: minor(figures.gross),
    }
  })

  const rates = taxByRate(p, groups)
  let net = 0n
  let tax = 0n
  for (const r of rates) {
    net += r.net
    tax += r.tax
  }
  const gross = net + tax
  const partsGross = taxByRate(p, partGroups).reduce((sum, r) => sum + r.gross, 0n)
  const { deposit, adjustment } = depositFor(p, gross, partsGross)

  return {
    labour: minor(labour),
    parts: minor(parts),
    fees: minor(fees),
    subtotal: minor(subtotal),
    sharedSaving: minor(saving),
    discount: minor(discount),
    net: minor(net),
    taxByRate: rates.map((r) => ({ rate: r.key, net: minor(r.net), tax: minor(r.tax), gross: minor(r.gross) })),
    tax: minor(tax),
    gross: minor(gross),
    deposit: minor(deposit),
    depositAdjustment: adjustment,
    lines,
  }
}

/**
 * The deposit asked for, kept within what a card can take: never above the gross; raised to the
 * card minimum when it is smaller; none at all when even the whole gross is under that minimum.
 */
function depositFor(
  p: PreparedEstimate,
  gross: bigint,
  partsGross: bigint,
): { deposit: bigint; adjustment: ScopeResult['depositAdjustment'] } {
  const policy = p.deposit
  let deposit =
    policy.kind === 'percent'
      ? divideRounded(gross * policy.value, HUNDRED_PERCENT, 'half-up')
      : policy.kind === 'fixed'
        ? policy.value
        : policy.kind === 'parts'
          ? partsGross
          : 0n
  let adjustment: ScopeResult['depositAdjustment'] = null
  if (deposit > gross) {
    deposit = gross
    adjustment = 'capped-at-gross'
  }
  if (deposit > 0n && deposit < p.minimumCharge) {
    if (gross < p.minimumCharge) {
      deposit = 0n
      adjustment = 'gross-below-minimum'
    } else {
      deposit = p.minimumCharge
      adjustment = 'raised-to-minimum'
    }
  }
  return { deposit, adjustment }
}
