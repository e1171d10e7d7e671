/**
 * An independent, deliberately plain reading of the estimate rules (the issue text), written with
 * decimal.js and sharing no code with shared/estimate. The property tests compare the engine
 * with it on random estimates. It assumes valid input: the engine's own tests cover errors.
 */
import Decimal from 'decimal.js'
import type { EstimateInput } from '../../shared/estimate/contract'

const D = Decimal.clone({ precision: 200, rounding: Decimal.ROUND_HALF_UP })
type Dec = InstanceType<typeof D>

const halfUp = (x: Dec): Dec => x.toDecimalPlaces(0, Decimal.ROUND_HALF_UP)
const floor = (x: Dec): Dec => x.toDecimalPlaces(0, Decimal.ROUND_FLOOR)
const num = (x: Dec): number => x.toNumber()

/** Card minimums the reference assumes (Stripe's published minimums, as recalled: USD 0.50, GBP 0.30, EUR 0.50). */
const minimums: Record<string, number> = { USD: 50, GBP: 30, EUR: 50 }

export interface RefLine {
  amount: number
  sharedHours: string
  sharedSaving: number
  /** Tax on this line alone, half-up. */
  tax: number
}

export interface RefItem {
  id: string
  lines: RefLine[]
  net: number
  tax: number
  gross: number
  sharedSaving: number
}

export interface RefScope {
  labour: number
  parts: number
  fees: number
  subtotal: number
  sharedSaving: number
  discount: number
  lineDiscounts: number[]
  taxByRate: { rate: string; net: number; tax: number; gross: number }[]
  net: number
  tax: number
  gross: number
  deposit: number
}

export interface RefResult {
  items: RefItem[]
  approved: RefScope
  proposed: RefScope
}

type Line = EstimateInput['items'][number]['lines'][number]

interface Priced {
  line: Line
  amount: Dec
  sharedHours: Dec
  saving: Dec
}

export function referenceEstimate(input: EstimateInput): RefResult {
  const hoursOf = new Map(input.accessSteps.map((s) => [s.code, new D(s.hours)]))
  const includesOf = new Map(input.accessSteps.map((s) => [s.code, s.includes]))
  const closure = (codes: string[]): Set<string> => {
    const seen = new Set<string>()
    const visit = (code: string) => {
      if (seen.has(code)) return
      seen.add(code)
      for (const c of includesOf.get(code) ?? []) visit(c)
    }
    codes.forEach(visit)
    return seen
  }

  const priceLine = (line: Line, covered: Set<string>): Priced => {
    if (line.kind === 'part') {
      const amount = halfUp(new D(line.unitPrice).times(line.quantity))
      return { line, amount, sharedHours: new D(0), saving: new D(0) }
    }
    if (line.kind === 'fee') return { line, amount: new D(line.amount), sharedHours: new D(0), saving: new D(0) }
    const steps = closure(line.accessSteps)
    let shared = new D(0)
    for (const code of steps) if (covered.has(code)) shared = shared.plus(hoursOf.get(code)!)
    for (const code of steps) covered.add(code)
    const amount = halfUp(new D(line.rate).times(new D(line.hours).minus(shared)))
    const full = halfUp(new D(line.rate).times(line.hours))
    return { line, amount, sharedHours: shared, saving: full.minus(amount) }
  }

  /** Prices every item's lines for a scope; items outside the scope are priced as if approved, on a copy of what is covered. */
  const walk = (everyItemCounts: boolean): Priced[][] => {
    const covered = new Set<string>()
    return input.items.map((item) => {
      const counts = everyItemCounts || item.decision === 'approved'
      const view = counts ? covered : new Set(covered)
      return item.lines.map((line) => priceLine(line, view))
    })
  }

  const inclusive = input.taxMode === 'inclusive'
  const taxOf = (amount: Dec, rate: string): Dec =>
    inclusive ? amount.times(rate).div(new D(100).plus(rate)) : amount.times(rate).div(100)

  const asIfApproved = walk(false)
  const everything = walk(true)

  const items: RefItem[] = input.items.map((item, i) => {
    const lines = asIfApproved[i]!.map((p) => ({
      amount: num(p.amount),
      sharedHours: p.sharedHours.toFixed(),
      sharedSaving: num(p.saving),
      tax: num(halfUp(taxOf(p.amount, p.line.taxRate))),
    }))
    const amount = lines.reduce((s, l) => s + l.amount, 0)
    const tax = lines.reduce((s, l) => s + l.tax, 0)
    return {
      id: item.id,
      lines,
      net: inclusive ? amount - tax : amount,
      tax,
      gross: inclusive ? amount : amount + tax,
      sharedSaving: lines.reduce((s, l) => s + l.sharedSaving, 0),
    }
  })

  const scope = (priced: Priced[]): RefScope => {
    const sum = (f: (p: Priced) => boolean) => priced.filter(f).reduce((s, p) => s.plus(p.amount), new D(0))
    const subtotal = sum(() => true)

    let discount = new D(0)
    if (input.discount?.kind === 'percent') discount = halfUp(subtotal.times(input.discount.value).div(100))
    if (input.discount?.kind === 'amount') discount = D.min(input.discount.value, subtotal)

    // Largest remainder: floor of each exact share, then one unit each to the largest remainders, earlier line first on ties.
    const lineDiscounts = priced.map(() => new D(0))
    if (subtotal.gt(0)) {
      const exact = priced.map((p) => discount.times(p.amount).div(subtotal))
      exact.forEach((e, k) => (lineDiscounts[k] = floor(e)))
      let left = discount.minus(lineDiscounts.reduce((s, x) => s.plus(x), new D(0))).toNumber()
      const remainders = priced.map((p, k) => ({ k, r: discount.times(p.amount).mod(subtotal) }))
      remainders.sort((a, b) => b.r.comparedTo(a.r) || a.k - b.k)
      for (const { k } of remainders) {
        if (left === 0) break
        lineDiscounts[k] = lineDiscounts[k]!.plus(1)
        left--
      }
    }

    const groupsFor = (keep: (p: Priced) => boolean) => {
      const groups = new Map<string, { rate: Dec; amount: Dec; lineTax: Dec }>()
      priced.forEach((p, k) => {
        if (!keep(p)) return
        const rate = new D(p.line.taxRate)
        const key = rate.toFixed()
        const after = p.amount.minus(lineDiscounts[k]!)
        const g = groups.get(key) ?? { rate, amount: new D(0), lineTax: new D(0) }
        g.amount = g.amount.plus(after)
        g.lineTax = g.lineTax.plus(halfUp(taxOf(after, p.line.taxRate)))
        groups.set(key, g)
      })
      return [...groups.entries()]
        .sort((a, b) => a[1].rate.comparedTo(b[1].rate))
        .map(([key, g]) => {
          const exactTax = taxOf(g.amount, g.rate.toFixed())
          const tax =
            input.taxRounding === 'per-line' ? g.lineTax : input.taxRounding === 'per-invoice' ? halfUp(exactTax) : floor(exactTax)
          const net = inclusive ? g.amount.minus(tax) : g.amount
          return { rate: key, net, tax, gross: net.plus(tax) }
        })
    }

    const byRate = groupsFor(() => true)
    const net = byRate.reduce((s, g) => s.plus(g.net), new D(0))
    const tax = byRate.reduce((s, g) => s.plus(g.tax), new D(0))
    const gross = net.plus(tax)
    const partsGross = groupsFor((p) => p.line.kind === 'part').reduce((s, g) => s.plus(g.gross), new D(0))

    const minimum = new D(input.minimumCharge ?? minimums[input.currency] ?? 0)
    const policy = input.deposit
    let deposit =
      policy.kind === 'percent'
        ? halfUp(gross.times(policy.value).div(100))
        : policy.kind === 'fixed'
          ? new D(policy.value)
          : policy.kind === 'parts'
            ? partsGross
            : new D(0)
    deposit = D.min(deposit, gross)
    if (deposit.gt(0) && deposit.lt(minimum)) deposit = gross.lt(minimum) ? new D(0) : minimum

    return {
      labour: num(sum((p) => p.line.kind === 'labour')),
      parts: num(sum((p) => p.line.kind === 'part')),
      fees: num(sum((p) => p.line.kind === 'fee')),
      subtotal: num(subtotal),
      sharedSaving: num(priced.reduce((s, p) => s.plus(p.saving), new D(0))),
      discount: num(discount),
      lineDiscounts: lineDiscounts.map(num),
      taxByRate: byRate.map((g) => ({ rate: g.rate, net: num(g.net), tax: num(g.tax), gross: num(g.gross) })),
      net: num(net),
      tax: num(tax),
      gross: num(gross),
      deposit: num(deposit),
    }
  }

  return {
    items,
    approved: scope(input.items.flatMap((item, i) => (item.decision === 'approved' ? asIfApproved[i]! : []))),
    proposed: scope(everything.flat()),
  }
}
