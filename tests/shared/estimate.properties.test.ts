/**
 * Property tests: random valid estimates, checked against the independent decimal.js reference
 * (tests/shared/reference-estimate.ts) and against invariants that must hold for any estimate.
 * Run counts are kept modest so the whole shared suite stays within a few seconds.
 */
import Decimal from 'decimal.js'
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { calculateEstimate } from '../../shared/estimate'
import {
  EstimateResultSchema,
  type EstimateInput,
  type EstimateItem,
  type EstimateLine,
  type EstimateResult,
} from '../../shared/estimate/contract'
import { referenceEstimate } from './reference-estimate'

const text = (scaled: number, places: number) => new Decimal(scaled).div(10 ** places).toFixed()

const anyTaxRate = ['0', '5', '20', '17.5', '8.25']

interface Shape {
  labourRates?: fc.Arbitrary<number>
  taxRates?: fc.Arbitrary<string>
}

/**
 * Random estimates that satisfy every input rule: access steps only include earlier steps (no
 * loops), book hours are at least the access time, and an approved item only requires approved items.
 */
function estimates({
  labourRates = fc.integer({ min: 0, max: 15_000 }),
  taxRates = fc.constantFrom(...anyTaxRate),
}: Shape = {}): fc.Arbitrary<EstimateInput> {
  return fc.integer({ min: 0, max: 6 }).chain((stepCount) => {
    const codes = Array.from({ length: stepCount }, (_, s) => `s${s}`)
    const steps = fc.tuple(
      ...codes.map((code, s) =>
        fc.record({ code: fc.constant(code), hours: fc.integer({ min: 0, max: 150 }), includes: fc.subarray(codes.slice(0, s)) }),
      ),
    )
    const line: fc.Arbitrary<EstimateLine> = fc.oneof(
      fc.record({
        kind: fc.constant('labour' as const),
        description: fc.constant('Labour'),
        hours: fc.integer({ min: 0, max: 400 }).map((h) => text(h, 2)),
        rate: labourRates,
        taxRate: taxRates,
        accessSteps: fc.subarray(codes),
      }),
      fc.record({
        kind: fc.constant('part' as const),
        description: fc.constant('Part'),
        quantity: fc.integer({ min: 0, max: 5_000 }).map((q) => text(q, 3)),
        unitPrice: fc.integer({ min: 0, max: 60_000 }),
        taxRate: taxRates,
      }),
      fc.record({
        kind: fc.constant('fee' as const),
        description: fc.constant('Fee'),
        amount: fc.integer({ min: 0, max: 5_000 }),
        taxRate: taxRates,
      }),
    )
    const items = fc.array(
      fc.record({
        decision: fc.constantFrom('approved' as const, 'declined' as const, 'pending' as const),
        lines: fc.array(line, { maxLength: 4 }),
        requires: fc.array(fc.nat(), { maxLength: 2 }),
      }),
      { maxLength: 6 },
    )
    return fc
      .record({
        currency: fc.constantFrom('GBP', 'EUR', 'USD', 'JPY', 'KWD'),
        taxMode: fc.constantFrom('exclusive' as const, 'inclusive' as const),
        taxRounding: fc.constantFrom('per-line' as const, 'per-invoice' as const, 'per-invoice-down' as const),
        steps,
        items,
        discount: fc.oneof(
          fc.constant(null),
          fc.integer({ min: 0, max: 10_000 }).map((p) => ({ kind: 'percent' as const, value: text(p, 2) })),
          fc.integer({ min: 0, max: 50_000 }).map((v) => ({ kind: 'amount' as const, value: v })),
        ),
        deposit: fc.oneof(
          fc.constant({ kind: 'none' as const }),
          fc.integer({ min: 0, max: 10_000 }).map((p) => ({ kind: 'percent' as const, value: text(p, 2) })),
          fc.integer({ min: 0, max: 100_000 }).map((v) => ({ kind: 'fixed' as const, value: v })),
          fc.constant({ kind: 'parts' as const }),
        ),
        minimumCharge: fc.option(fc.integer({ min: 0, max: 5_000 }), { nil: undefined }),
      })
      .map((r): EstimateInput => {
        const stepHours = new Map(r.steps.map((s) => [s.code, s.hours]))
        const includes = new Map(r.steps.map((s) => [s.code, s.includes]))
        const accessHours = (codes: string[]) => {
          const seen = new Set<string>()
          const visit = (c: string) => {
            if (seen.has(c)) return
            seen.add(c)
            includes.get(c)?.forEach(visit)
          }
          codes.forEach(visit)
          return [...seen].reduce((sum, c) => sum + stepHours.get(c)!, 0)
        }
        const ids = r.items.map((_, i) => `item-${i}`)
        return {
          currency: r.currency,
          taxMode: r.taxMode,
          taxRounding: r.taxRounding,
          accessSteps: r.steps.map((s) => ({ code: s.code, hours: text(s.hours, 2), includes: s.includes })),
          items: r.items.map((it, i): EstimateItem => ({
            id: ids[i]!,
            title: `Item ${i + 1}`,
            decision: it.decision,
            requires: [
              ...new Set(
                it.requires
                  .map((n) => n % Math.max(1, r.items.length))
                  .filter((n) => n !== i && (it.decision !== 'approved' || r.items[n]?.decision === 'approved'))
                  .map((n) => ids[n]!),
              ),
            ],
            lines: it.lines.map((l) =>
              // Book time includes access, so the generated hours are the extra work on top of it.
              l.kind === 'labour' ? { ...l, hours: text(accessHours(l.accessSteps) + Math.round(Number(l.hours) * 100), 2) } : l,
            ),
          })),
          discount: r.discount,
          deposit: r.deposit,
          ...(r.minimumCharge === undefined ? {} : { minimumCharge: r.minimumCharge }),
        }
      })
  })
}

const sum = (xs: number[]) => xs.reduce((a, b) => a + b, 0)

function scopeFigures(s: EstimateResult['approved']) {
  return {
    labour: s.labour,
    parts: s.parts,
    fees: s.fees,
    subtotal: s.subtotal,
    sharedSaving: s.sharedSaving,
    discount: s.discount,
    lineDiscounts: s.lines.map((l) => l.discount),
    taxByRate: s.taxByRate,
    net: s.net,
    tax: s.tax,
    gross: s.gross,
    deposit: s.deposit,
  }
}

describe('estimate engine against the decimal.js reference', () => {
  it('agrees on every item and both scopes', () => {
    fc.assert(
      fc.property(estimates(), (input) => {
        const result = calculateEstimate(input)
        const ref = referenceEstimate(input)
        expect(
          result.items.map((i) => ({
            id: i.id,
            lines: i.lines.map((l) => ({ amount: l.amount, sharedHours: l.sharedHours, sharedSaving: l.sharedSaving, tax: l.tax })),
            net: i.net,
            tax: i.tax,
            gross: i.gross,
            sharedSaving: i.sharedSaving,
          })),
        ).toEqual(ref.items)
        expect(scopeFigures(result.approved)).toEqual(ref.approved)
        expect(scopeFigures(result.proposed)).toEqual(ref.proposed)
      }),
      { numRuns: 150 },
    )
  })
})

describe('estimate invariants', () => {
  it('totals are the sums of their lines, tax by rate sums to the tax, and the result fits its schema', () => {
    fc.assert(
      fc.property(estimates(), (input) => {
        const result = calculateEstimate(input)
        expect(EstimateResultSchema.safeParse(result).success).toBe(true)
        for (const s of [result.approved, result.proposed]) {
          expect(s.labour + s.parts + s.fees).toBe(s.subtotal)
          expect(sum(s.lines.map((l) => l.amount))).toBe(s.subtotal)
          expect(sum(s.lines.map((l) => l.sharedSaving))).toBe(s.sharedSaving)
          expect(sum(s.taxByRate.map((r) => r.net))).toBe(s.net)
          expect(sum(s.taxByRate.map((r) => r.tax))).toBe(s.tax)
          expect(sum(s.taxByRate.map((r) => r.gross))).toBe(s.gross)
          expect(s.net + s.tax).toBe(s.gross)
          if (input.taxRounding === 'per-line') expect(sum(s.lines.map((l) => l.tax))).toBe(s.tax)
        }
        for (const i of result.items) {
          expect(sum(i.lines.map((l) => l.gross))).toBe(i.gross)
          expect(i.net + i.tax).toBe(i.gross)
        }
      }),
      { numRuns: 100 },
    )
  })

  it('discount shares sum exactly to the discount and each is its exact share rounded down or up', () => {
    fc.assert(
      fc.property(estimates(), (input) => {
        const result = calculateEstimate(input)
        for (const s of [result.approved, result.proposed]) {
          expect(sum(s.lines.map((l) => l.discount))).toBe(s.discount)
          expect(s.discount).toBeLessThanOrEqual(s.subtotal)
          for (const l of s.lines) {
            const exact = s.subtotal === 0 ? new Decimal(0) : new Decimal(s.discount).times(l.amount).div(s.subtotal)
            expect(l.discount).toBeGreaterThanOrEqual(exact.floor().toNumber())
            expect(l.discount).toBeLessThanOrEqual(exact.ceil().toNumber())
          }
        }
      }),
      { numRuns: 100 },
    )
  })

  it('the deposit is never above the gross, and is either nothing or at least the card minimum', () => {
    fc.assert(
      fc.property(estimates(), (input) => {
        const result = calculateEstimate(input)
        for (const s of [result.approved, result.proposed]) {
          expect(s.deposit).toBeGreaterThanOrEqual(0)
          expect(s.deposit).toBeLessThanOrEqual(s.gross)
          if (s.deposit > 0) expect(s.deposit).toBeGreaterThanOrEqual(Math.min(result.minimumCharge, s.gross))
        }
      }),
      { numRuns: 100 },
    )
  })

  it('shared access never makes a line negative and never saves more than the line would cost', () => {
    fc.assert(
      fc.property(estimates(), (input) => {
        const result = calculateEstimate(input)
        const lines = [...result.items.flatMap((i) => i.lines), ...result.approved.lines, ...result.proposed.lines]
        for (const l of lines) {
          expect(l.amount).toBeGreaterThanOrEqual(0)
          expect(l.sharedSaving).toBeGreaterThanOrEqual(0)
          expect(l.net).toBeGreaterThanOrEqual(0)
        }
        // amount + saving is the line's unshared price, the same in every scope.
        result.items.forEach((item, i) =>
          item.lines.forEach((l, j) => {
            const proposed = result.proposed.lines.find((p) => p.itemId === item.id && p.line === j)!
            expect(proposed.amount + proposed.sharedSaving).toBe(l.amount + l.sharedSaving)
            expect(input.items[i]!.lines[j]!.kind).toBe(l.kind)
          }),
        )
      }),
      { numRuns: 100 },
    )
  })

  it('moving declined items around changes neither the approved scope nor any other item', () => {
    const withShuffle = estimates().chain((input) =>
      fc
        .shuffledSubarray(
          input.items.map((_, i) => i),
          { minLength: input.items.length },
        )
        .map((order) => ({ input, order })),
    )
    fc.assert(
      fc.property(withShuffle, ({ input, order }) => {
        // Keep every non-declined item in its place and fill the declined slots in the shuffled order.
        const declined = order.filter((i) => input.items[i]!.decision === 'declined')
        const items = input.items.map((it) => (it.decision === 'declined' ? input.items[declined.shift()!]! : it))
        const before = calculateEstimate(input)
        const after = calculateEstimate({ ...input, items })
        expect(after.approved).toEqual(before.approved)
        const figures = (r: EstimateResult) =>
          r.items
            .filter((i) => i.decision !== 'declined')
            .map((i) => ({
              id: i.id,
              net: i.net,
              tax: i.tax,
              gross: i.gross,
              lines: i.lines.map((l) => [l.amount, l.sharedHours, l.shared.map((s) => s.itemId)]),
            }))
        expect(figures(after)).toEqual(figures(before))
      }),
      { numRuns: 100 },
    )
  })

  it('approved totals never exceed proposed totals when every line has one labour rate and one tax rate', () => {
    // With one rate of each, sharing only moves access time to an earlier line at the same price,
    // so approving more can only add. With different labour rates or tax rates it can subtract;
    // the engine tests show both cases.
    const oneRate = estimates({ labourRates: fc.constant(9_000), taxRates: fc.constant('20') })
    fc.assert(
      fc.property(oneRate, (input) => {
        const { approved, proposed } = calculateEstimate(input)
        expect(approved.subtotal).toBeLessThanOrEqual(proposed.subtotal)
        expect(approved.net).toBeLessThanOrEqual(proposed.net)
        expect(approved.gross).toBeLessThanOrEqual(proposed.gross)
      }),
      { numRuns: 150 },
    )
  })
})
