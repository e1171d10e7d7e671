/**
 * Worked cases for the estimate engine. Unless a comment names another source, expected
 * figures are worked by hand from the rules in the issue, and prices are invented demo numbers.
 */
import { describe, expect, it } from 'vitest'
import { calculateEstimate, EstimateInputError, EstimateInputSchema, safeCalculateEstimate } from '../../shared/estimate'
import { EstimateResultSchema, type EstimateInput, type EstimateItem } from '../../shared/estimate/contract'
import { estimate, fee, item, labour, part } from './estimate-helpers'

// Invented demo numbers: front-left access on a live-axle 4x4. Own hours only; the hub strip
// includes the caliper, which includes the wheel, so the hub's access time is 1.0 + 0.3 + 0.2 = 1.5 h.
const frontLeftSteps: EstimateInput['accessSteps'] = [
  { code: 'wheel-off-fl', label: 'front left wheel off', hours: '0.2', includes: [] },
  { code: 'caliper-off-fl', label: 'front left caliper off', hours: '0.3', includes: ['wheel-off-fl'] },
  { code: 'hub-strip-fl', label: 'front left hub off', hours: '1.0', includes: ['caliper-off-fl'] },
]

const cvJoint = (decision: EstimateItem['decision']) =>
  item(
    'cv-fl',
    decision,
    [labour('3.2', 8500, '20', ['hub-strip-fl'], 'Replace outer CV joint'), part('1', 14999, '20', 'CV joint kit')],
    [],
    'Replace front left CV joint',
  )
const swivel = (decision: EstimateItem['decision']) =>
  item(
    'swivel-fl',
    decision,
    [labour('2.6', 8500, '20', ['hub-strip-fl'], 'Reseal swivel housing'), part('1', 3250, '20', 'Swivel seal kit')],
    [],
    'Reseal front left swivel housing',
  )

describe('shared access: CV joint and swivel housing reseal on the same side', () => {
  // CV joint labour: 3.2 h × £85 = £272.00. Swivel labour: 2.6 h × £85 = £221.00 on its own;
  // after the CV joint has the hub off, 2.6 − 1.5 = 1.1 h × £85 = £93.50, saving £127.50.
  it.each([
    { cv: 'approved', swivel: 'approved', swivelAmount: 9350, swivelShared: '1.5', swivelSaving: 12750, approvedLabour: 27200 + 9350 },
    { cv: 'declined', swivel: 'approved', swivelAmount: 22100, swivelShared: '0', swivelSaving: 0, approvedLabour: 22100 },
    // A pending item does not take the hub off for anyone until it is approved.
    { cv: 'pending', swivel: 'approved', swivelAmount: 22100, swivelShared: '0', swivelSaving: 0, approvedLabour: 22100 },
    // A pending or declined item shows what it would cost if approved now: the hub is already off.
    { cv: 'approved', swivel: 'pending', swivelAmount: 9350, swivelShared: '1.5', swivelSaving: 12750, approvedLabour: 27200 },
    { cv: 'approved', swivel: 'declined', swivelAmount: 9350, swivelShared: '1.5', swivelSaving: 12750, approvedLabour: 27200 },
    { cv: 'pending', swivel: 'pending', swivelAmount: 22100, swivelShared: '0', swivelSaving: 0, approvedLabour: 0 },
    { cv: 'declined', swivel: 'declined', swivelAmount: 22100, swivelShared: '0', swivelSaving: 0, approvedLabour: 0 },
  ] as const)(
    'CV joint $cv, swivel $swivel',
    ({ cv, swivel: swivelDecision, swivelAmount, swivelShared, swivelSaving, approvedLabour }) => {
      const result = calculateEstimate(estimate({ accessSteps: frontLeftSteps, items: [cvJoint(cv), swivel(swivelDecision)] }))
      const [cvItem, swivelItem] = result.items
      expect(cvItem!.lines[0]).toMatchObject({ amount: 27200, sharedHours: '0', sharedSaving: 0, note: null })
      expect(swivelItem!.lines[0]).toMatchObject({ amount: swivelAmount, sharedHours: swivelShared, sharedSaving: swivelSaving })
      expect(swivelItem!.sharedSaving).toBe(swivelSaving)
      expect(result.approved.labour).toBe(approvedLabour)
      // Everything approved: the CV joint pays for the hub once.
      expect(result.proposed.labour).toBe(27200 + 9350)
      expect(result.proposed.sharedSaving).toBe(12750)
    },
  )

  it('says which steps were already done and for which item', () => {
    const result = calculateEstimate(estimate({ accessSteps: frontLeftSteps, items: [cvJoint('approved'), swivel('approved')] }))
    const line = result.items[1]!.lines[0]!
    expect(line.shared.map((s) => [s.step, s.hours, s.itemId, s.itemNumber, s.line])).toEqual([
      ['hub-strip-fl', '1', 'cv-fl', 1, 0],
      ['caliper-off-fl', '0.3', 'cv-fl', 1, 0],
      ['wheel-off-fl', '0.2', 'cv-fl', 1, 0],
    ])
    expect(line.note).toBe(
      'front left hub off, front left caliper off, front left wheel off already done for item 1 (Replace front left CV joint)',
    )
  })

  it('shows the saving on the later item whichever job comes first', () => {
    // Swivel first: it pays for the hub; the CV joint's 3.2 − 1.5 = 1.7 h × £85 = £144.50.
    const result = calculateEstimate(estimate({ accessSteps: frontLeftSteps, items: [swivel('approved'), cvJoint('approved')] }))
    expect(result.items.map((i) => i.lines[0]!.amount)).toEqual([22100, 14450])
    expect(result.approved.labour).toBe(22100 + 14450)
  })

  it('shares only the steps a job needs', () => {
    // Brake pads need the caliper off (0.3 h, including the wheel 0.2 h: 0.5 h). After the CV
    // joint: 0.8 − 0.5 = 0.3 h × £85 = £25.50.
    const pads = item('pads-fl', 'approved', [labour('0.8', 8500, '20', ['caliper-off-fl'])])
    const result = calculateEstimate(estimate({ accessSteps: frontLeftSteps, items: [cvJoint('approved'), pads] }))
    expect(result.items[1]!.lines[0]).toMatchObject({ amount: 2550, sharedHours: '0.5', sharedSaving: 4250 })
    expect(result.items[1]!.lines[0]!.shared.map((s) => s.step)).toEqual(['caliper-off-fl', 'wheel-off-fl'])
  })

  it('shares between two labour lines of one item', () => {
    const both = item('both-fl', 'pending', [labour('3.2', 8500, '20', ['hub-strip-fl']), labour('2.6', 8500, '20', ['hub-strip-fl'])])
    const result = calculateEstimate(estimate({ accessSteps: frontLeftSteps, items: [both] }))
    expect(result.items[0]!.lines.map((l) => l.amount)).toEqual([27200, 9350])
    expect(result.items[0]!.lines[1]!.shared[0]).toMatchObject({ itemId: 'both-fl', itemNumber: 1, line: 0 })
    expect(result.approved.labour).toBe(0)
    expect(result.proposed.labour).toBe(27200 + 9350)
  })

  it('rounds the shared line once, and its saving is the difference from the unshared price', () => {
    // 1.30 h × 8550 = 11115.00; 1.19 h × 8550 = 10174.50 → 10175 (half-up); saving 11115 − 10175 = 940,
    // not 0.11 h × 8550 = 940.50 → 941 rounded separately.
    const steps = [{ code: 'guard-off', hours: '0.11', includes: [] }]
    const result = calculateEstimate(
      estimate({
        accessSteps: steps,
        items: [
          item('a', 'approved', [labour('0.5', 8550, '20', ['guard-off'])]),
          item('b', 'approved', [labour('1.30', 8550, '20', ['guard-off'])]),
        ],
      }),
    )
    expect(result.items[1]!.lines[0]).toMatchObject({ amount: 10175, sharedHours: '0.11', sharedSaving: 940 })
  })

  it('can make the approved total larger than the proposed total when shared access moves to a cheaper line', () => {
    // Found by the property tests, kept as a record of how the rule behaves: with everything
    // approved, the earlier pending item at £50/h takes the hub off instead of the £100/h item.
    const steps = [{ code: 'hub', hours: '1', includes: [] }]
    const byRate = calculateEstimate(
      estimate({
        accessSteps: steps,
        items: [
          item('cheap', 'pending', [labour('1', 5000, '20', ['hub'])]),
          item('dear', 'approved', [labour('1', 10000, '20', ['hub'])]),
        ],
      }),
    )
    expect(byRate.approved.subtotal).toBe(10000)
    expect(byRate.proposed.subtotal).toBe(5000)
    // The same with one labour rate but different tax rates: the hub moves to a zero-rated line.
    const byTax = calculateEstimate(
      estimate({
        accessSteps: steps,
        items: [item('zero', 'pending', [labour('1', 9000, '0', ['hub'])]), item('std', 'approved', [labour('1', 9000, '20', ['hub'])])],
      }),
    )
    expect(byTax.approved.gross).toBe(10800)
    expect(byTax.proposed.gross).toBe(9000)
  })
})

describe('line prices', () => {
  it.each([
    { line: labour('1.25', 8555), amount: 10694 }, // 10693.75 → 10694
    { line: labour('0.1', 8500), amount: 850 },
    { line: labour('0', 8500), amount: 0 },
    { line: part('2.5', 1199), amount: 2998 }, // 2997.5 → 2998 (half-up)
    { line: part('0.333', 1000), amount: 333 },
    { line: part('1.005', 100), amount: 101 }, // 100.5 → 101
    { line: fee(450), amount: 450 },
  ])('$line.kind → $amount', ({ line, amount }) => {
    const result = calculateEstimate(estimate({ items: [item('a', 'approved', [line])] }))
    expect(result.items[0]!.lines[0]!.amount).toBe(amount)
  })

  it('treats "20" and "20.00" as one tax rate', () => {
    const result = calculateEstimate(
      estimate({ items: [item('a', 'approved', [fee(1000, '20'), fee(1000, '20.00'), fee(500, '5.50'), fee(500, '5.5')])] }),
    )
    expect(result.approved.taxByRate).toEqual([
      { rate: '5.5', net: 1000, tax: 56, gross: 1056 },
      { rate: '20', net: 2000, tax: 400, gross: 2400 },
    ])
  })

  it('prices an estimate with no items as zero', () => {
    const result = calculateEstimate(estimate({ items: [], deposit: { kind: 'percent', value: '50' } }))
    expect(result.approved).toMatchObject({ subtotal: 0, net: 0, tax: 0, gross: 0, deposit: 0, taxByRate: [], lines: [] })
  })
})

describe('estimate-level discount', () => {
  // Two approved lines: £100.00 at 20% and £50.00 at 0%, exclusive of tax, rounded per line.
  const lines = [item('a', 'approved', [fee(10000, '20')]), item('b', 'approved', [fee(5000, '0')])]

  it.each([
    // £10 over 10000:5000: exact 666.67 / 333.33; floors 666 / 333; the spare penny to the larger remainder (line 1).
    { discount: { kind: 'amount', value: 1000 }, total: 1000, shares: [667, 333], net: 14000, tax: 1867, gross: 15867 },
    // 12.5% of 15000 = 1875, split exactly 1250 / 625.
    { discount: { kind: 'percent', value: '12.5' }, total: 1875, shares: [1250, 625], net: 13125, tax: 1750, gross: 14875 },
    // 33.33% of 15000 = 4999.5 → 5000; exact 3333.33 / 1666.67; the spare penny goes to line 2's larger remainder.
    { discount: { kind: 'percent', value: '33.33' }, total: 5000, shares: [3333, 1667], net: 10000, tax: 1333, gross: 11333 },
    // An amount larger than the lines is capped at their sum.
    { discount: { kind: 'amount', value: 20000 }, total: 15000, shares: [10000, 5000], net: 0, tax: 0, gross: 0 },
    { discount: { kind: 'percent', value: '100' }, total: 15000, shares: [10000, 5000], net: 0, tax: 0, gross: 0 },
    { discount: null, total: 0, shares: [0, 0], net: 15000, tax: 2000, gross: 17000 },
  ] as const)('$discount', ({ discount, total, shares, net, tax, gross }) => {
    const result = calculateEstimate(estimate({ items: [...lines], discount }))
    expect(result.approved.discount).toBe(total)
    expect(result.approved.lines.map((l) => l.discount)).toEqual(shares)
    expect(result.approved).toMatchObject({ net, tax, gross })
    // Item figures come before the discount.
    expect(result.items.map((i) => i.gross)).toEqual([12000, 5000])
  })

  it('gives tied spare units to the earlier line', () => {
    const result = calculateEstimate(
      estimate({ items: [item('a', 'approved', [fee(100, '0'), fee(100, '0'), fee(100, '0')])], discount: { kind: 'amount', value: 100 } }),
    )
    expect(result.approved.lines.map((l) => l.discount)).toEqual([34, 33, 33])
  })

  it('applies to gross amounts when prices include tax', () => {
    // Gross 12000 at 20% and 6000 at 0%, £18 off: shares 1200 / 600; tax inside 10800 is 10800 / 6 = 1800.
    const result = calculateEstimate(
      estimate({
        taxMode: 'inclusive',
        items: [item('a', 'approved', [fee(12000, '20')]), item('b', 'approved', [fee(6000, '0')])],
        discount: { kind: 'amount', value: 1800 },
      }),
    )
    expect(result.approved.lines.map((l) => l.discount)).toEqual([1200, 600])
    expect(result.approved).toMatchObject({ net: 14400, tax: 1800, gross: 16200 })
  })

  it('is worked out separately for each scope', () => {
    const result = calculateEstimate(
      estimate({
        items: [item('a', 'approved', [fee(10000, '0')]), item('b', 'pending', [fee(5000, '0')])],
        discount: { kind: 'percent', value: '10' },
      }),
    )
    expect(result.approved.discount).toBe(1000)
    expect(result.proposed.discount).toBe(1500)
  })
})

describe('deposit', () => {
  /** One zero-rated fee, so the gross is exactly `gross`. */
  const depositFor = (currency: string, gross: number, deposit: EstimateInput['deposit'], minimumCharge?: number) =>
    calculateEstimate(
      estimate({
        currency,
        items: [item('a', 'approved', [fee(gross, '0')])],
        deposit,
        ...(minimumCharge === undefined ? {} : { minimumCharge }),
      }),
    ).approved

  // Card minimums: Stripe's published minimum charge amounts (GBP 0.30, USD 0.50, EUR 0.50), from memory of that page, not read here.
  it.each([
    { currency: 'GBP', gross: 250, deposit: { kind: 'percent', value: '10' }, expected: 30, adjustment: 'raised-to-minimum' }, // 25 < 30
    { currency: 'GBP', gross: 20, deposit: { kind: 'percent', value: '50' }, expected: 0, adjustment: 'gross-below-minimum' }, // 10, gross < 30
    { currency: 'GBP', gross: 29, deposit: { kind: 'fixed', value: 29 }, expected: 0, adjustment: 'gross-below-minimum' },
    { currency: 'GBP', gross: 30, deposit: { kind: 'percent', value: '10' }, expected: 30, adjustment: 'raised-to-minimum' }, // 3 → 30, the whole gross
    { currency: 'GBP', gross: 500, deposit: { kind: 'fixed', value: 1000 }, expected: 500, adjustment: 'capped-at-gross' },
    { currency: 'GBP', gross: 500, deposit: { kind: 'fixed', value: 10 }, expected: 30, adjustment: 'raised-to-minimum' },
    { currency: 'GBP', gross: 500, deposit: { kind: 'fixed', value: 30 }, expected: 30, adjustment: null }, // exactly the minimum
    { currency: 'GBP', gross: 500, deposit: { kind: 'fixed', value: 0 }, expected: 0, adjustment: null },
    { currency: 'GBP', gross: 500, deposit: { kind: 'none' }, expected: 0, adjustment: null },
    { currency: 'GBP', gross: 0, deposit: { kind: 'percent', value: '50' }, expected: 0, adjustment: null },
    { currency: 'GBP', gross: 12345, deposit: { kind: 'percent', value: '25' }, expected: 3086, adjustment: null }, // 3086.25 → 3086
    { currency: 'GBP', gross: 12346, deposit: { kind: 'percent', value: '25' }, expected: 3087, adjustment: null }, // 3086.5 → 3087 (half-up)
    { currency: 'USD', gross: 400, deposit: { kind: 'percent', value: '10' }, expected: 50, adjustment: 'raised-to-minimum' }, // 40 < 50
    { currency: 'USD', gross: 49, deposit: { kind: 'fixed', value: 40 }, expected: 0, adjustment: 'gross-below-minimum' },
    { currency: 'EUR', gross: 1000, deposit: { kind: 'percent', value: '4.95' }, expected: 50, adjustment: null }, // 49.5 → 50
    { currency: 'EUR', gross: 1000, deposit: { kind: 'percent', value: '4.94' }, expected: 50, adjustment: 'raised-to-minimum' }, // 49.4 → 49 → 50
    { currency: 'EUR', gross: 50, deposit: { kind: 'fixed', value: 1 }, expected: 50, adjustment: 'raised-to-minimum' },
    // No minimum is held for JPY, so any positive deposit stands.
    { currency: 'JPY', gross: 40, deposit: { kind: 'percent', value: '50' }, expected: 20, adjustment: null },
  ] as const)('$currency gross $gross, $deposit.kind $deposit.value → $expected', ({ currency, gross, deposit, expected, adjustment }) => {
    const scope = depositFor(currency, gross, deposit)
    expect(scope.gross).toBe(gross)
    expect(scope.deposit).toBe(expected)
    expect(scope.depositAdjustment).toBe(adjustment)
  })

  it.each([
    { minimumCharge: 0, gross: 20, expected: 10 }, // no minimum: 50% of 20
    { minimumCharge: 100, gross: 250, expected: 125 }, // 50% of 250 = 125 stands above the minimum
    { minimumCharge: 200, gross: 250, expected: 200 }, // 125 raised to 200
    { minimumCharge: 300, gross: 250, expected: 0 }, // gross below the minimum
  ])('an estimate-level minimum of $minimumCharge overrides the currency default', ({ minimumCharge, gross, expected }) => {
    expect(depositFor('GBP', gross, { kind: 'percent', value: '50' }, minimumCharge).deposit).toBe(expected)
  })

  it('takes the approved parts after discount and tax', () => {
    // Labour 1 h × £50 and a £10 part, both 20%, 10% off: discount 600 split 500 / 100; the part
    // is 900 net + 180 tax = 1080.
    const result = calculateEstimate(
      estimate({
        items: [item('a', 'approved', [labour('1', 5000), part('1', 1000)]), item('b', 'pending', [part('1', 9000)])],
        discount: { kind: 'percent', value: '10' },
        deposit: { kind: 'parts' },
      }),
    )
    expect(result.approved).toMatchObject({ net: 5400, tax: 1080, gross: 6480, deposit: 1080 })
    // Everything approved: parts 1000 + 9000, 10% off (the discount of 1500 is shared pro rata) → 9000 net + 1800 tax.
    expect(result.proposed).toMatchObject({ discount: 1500, deposit: 10800 })
  })
})

describe('input errors', () => {
  const valid = (): EstimateInput =>
    estimate({
      accessSteps: frontLeftSteps.map((s) => ({ ...s, includes: [...s.includes] })),
      items: [cvJoint('approved'), swivel('approved')],
    })

  it.each<{ name: string; change: (e: EstimateInput) => unknown; path: (string | number)[]; message?: RegExp }>([
    {
      name: 'a loop in access steps',
      // The caliper now includes the hub, which includes the caliper. Steps are explored in list
      // order, so the loop is found at the hub's entry that leads back to the caliper.
      change: (e) => e.accessSteps[1]!.includes.push('hub-strip-fl'),
      path: ['accessSteps', 2, 'includes', 0],
      message: /loop: caliper-off-fl → hub-strip-fl → caliper-off-fl/,
    },
    {
      name: 'a step that includes itself',
      change: (e) => e.accessSteps[0]!.includes.push('wheel-off-fl'),
      path: ['accessSteps', 0, 'includes', 0],
      message: /loop/,
    },
    {
      name: 'an unknown included step',
      change: (e) => e.accessSteps[0]!.includes.push('tyre-off'),
      path: ['accessSteps', 0, 'includes', 0],
      message: /unknown step "tyre-off"/,
    },
    {
      name: 'a step listed twice',
      change: (e) => e.accessSteps.push({ code: 'wheel-off-fl', hours: '0.1', includes: [] }),
      path: ['accessSteps', 3, 'code'],
    },
    {
      name: 'an unknown step on a labour line',
      change: (e) => (e.items[1]!.lines[0] as { accessSteps: string[] }).accessSteps.push('hub-strip-fr'),
      path: ['items', 1, 'lines', 0, 'accessSteps', 1],
      message: /Unknown access step "hub-strip-fr"/,
    },
    {
      name: 'access time longer than the book time',
      change: (e) => ((e.items[0]!.lines[0] as { hours: string }).hours = '1.4'),
      path: ['items', 0, 'lines', 0, 'hours'],
      message: /access steps take 1.5 h, more than the line's book time of 1.4 h/,
    },
    {
      name: 'an approved item requiring a declined one',
      change: (e) => {
        e.items[0]!.decision = 'declined'
        e.items[1]!.requires.push('cv-fl')
      },
      path: ['items', 1, 'requires', 0],
      message:
        /item 2 "Reseal front left swivel housing" \(swivel-fl\) is approved but requires item 1 "Replace front left CV joint" \(cv-fl\), which is declined/,
    },
    {
      name: 'an approved item requiring a pending one',
      change: (e) => {
        e.items[0]!.decision = 'pending'
        e.items[1]!.requires.push('cv-fl')
      },
      path: ['items', 1, 'requires', 0],
      message: /swivel-fl.*cv-fl.*which is pending/,
    },
    {
      name: 'a requirement on an unknown item',
      change: (e) => e.items[1]!.requires.push('cv-fr'),
      path: ['items', 1, 'requires', 0],
      message: /unknown item "cv-fr"/,
    },
    {
      name: 'an item requiring itself',
      change: (e) => e.items[1]!.requires.push('swivel-fl'),
      path: ['items', 1, 'requires', 0],
      message: /cannot require itself/,
    },
    { name: 'an item id used twice', change: (e) => (e.items[1]!.id = 'cv-fl'), path: ['items', 1, 'id'] },
    {
      name: 'hours with a comma',
      change: (e) => ((e.items[0]!.lines[0] as { hours: string }).hours = '3,2'),
      path: ['items', 0, 'lines', 0, 'hours'],
      message: /decimal string/,
    },
    {
      name: 'hours with three places',
      change: (e) => ((e.items[0]!.lines[0] as { hours: string }).hours = '3.205'),
      path: ['items', 0, 'lines', 0, 'hours'],
    },
    {
      name: 'hours as a number',
      change: (e) => ((e.items[0]!.lines[0] as unknown as { hours: number }).hours = 3.2),
      path: ['items', 0, 'lines', 0, 'hours'],
    },
    {
      name: 'hours in exponent form',
      change: (e) => ((e.items[0]!.lines[0] as { hours: string }).hours = '3e1'),
      path: ['items', 0, 'lines', 0, 'hours'],
    },
    {
      name: 'hours above the limit',
      change: (e) => ((e.items[0]!.lines[0] as { hours: string }).hours = '10000.01'),
      path: ['items', 0, 'lines', 0, 'hours'],
      message: /at most 10000/,
    },
    {
      name: 'a negative quantity',
      change: (e) => ((e.items[0]!.lines[1] as { quantity: string }).quantity = '-1'),
      path: ['items', 0, 'lines', 1, 'quantity'],
    },
    {
      name: 'a tax rate with a percent sign',
      change: (e) => (e.items[0]!.lines[1]!.taxRate = '20%'),
      path: ['items', 0, 'lines', 1, 'taxRate'],
    },
    {
      name: 'a tax rate above 100',
      change: (e) => (e.items[0]!.lines[1]!.taxRate = '120'),
      path: ['items', 0, 'lines', 1, 'taxRate'],
      message: /at most 100/,
    },
    { name: 'a step with bad hours', change: (e) => (e.accessSteps[0]!.hours = '.2'), path: ['accessSteps', 0, 'hours'] },
    { name: 'a bad discount percentage', change: (e) => (e.discount = { kind: 'percent', value: 'ten' }), path: ['discount', 'value'] },
    { name: 'a discount above 100%', change: (e) => (e.discount = { kind: 'percent', value: '100.01' }), path: ['discount', 'value'] },
    { name: 'a deposit percentage above 100', change: (e) => (e.deposit = { kind: 'percent', value: '101' }), path: ['deposit', 'value'] },
    {
      name: 'a price in pounds rather than pence',
      change: (e) => ((e.items[0]!.lines[1] as { unitPrice: number }).unitPrice = 149.99),
      path: ['items', 0, 'lines', 1, 'unitPrice'],
    },
    {
      name: 'a negative fee',
      change: (e) => e.items[0]!.lines.push({ kind: 'fee', description: 'Refund', amount: -100, taxRate: '20' }),
      path: ['items', 0, 'lines', 2, 'amount'],
    },
    { name: 'an unknown currency', change: (e) => (e.currency = 'XYZ'), path: ['currency'], message: /currency/ },
    { name: 'a lower-case currency code', change: (e) => (e.currency = 'gbp'), path: ['currency'] },
    { name: 'a currency the engine excludes', change: (e) => (e.currency = 'MGA'), path: ['currency'] },
    {
      name: 'an unknown decision',
      change: (e) => ((e.items[0] as { decision: string }).decision = 'maybe'),
      path: ['items', 0, 'decision'],
    },
    {
      name: 'a misspelt field',
      change: (e) => Object.assign(e.items[0]!.lines[0]!, { acessSteps: ['hub-strip-fl'] }),
      path: ['items', 0, 'lines', 0],
      message: /acessSteps/,
    },
  ])('$name', ({ change, path, message }) => {
    const input = valid()
    change(input)
    const result = safeCalculateEstimate(input)
    expect(result.success).toBe(false)
    if (result.success) return
    const issue = result.issues.find((i) => JSON.stringify(i.path) === JSON.stringify(path))
    expect(issue, JSON.stringify(result.issues)).toBeDefined()
    if (message) expect(issue!.message).toMatch(message)

    // The schema alone reports the same problem, so the server's validate() middleware can use it.
    const viaSchema = EstimateInputSchema.safeParse(input)
    expect(viaSchema.success).toBe(false)
    expect(viaSchema.error?.issues.map((i) => i.path)).toContainEqual(path)

    expect(() => calculateEstimate(input)).toThrow(EstimateInputError)
  })

  it('accepts the unchanged estimate', () => {
    expect(safeCalculateEstimate(valid()).success).toBe(true)
    expect(EstimateInputSchema.safeParse(valid()).success).toBe(true)
  })

  it('reports every problem at once', () => {
    const input = valid()
    input.currency = 'XYZ'
    input.items[1]!.lines[0]!.taxRate = '20%'
    const result = safeCalculateEstimate(input)
    expect(result.success ? [] : result.issues.map((i) => i.path)).toEqual([['currency'], ['items', 1, 'lines', 0, 'taxRate']])
  })

  it('refuses an estimate too large for exact minor units', () => {
    const result = safeCalculateEstimate(estimate({ items: [item('a', 'approved', [labour('10000', Number.MAX_SAFE_INTEGER)])] }))
    expect(result).toMatchObject({
      success: false,
      issues: [{ code: 'custom', path: [], message: expect.stringMatching(/more than can be represented/) }],
    })
  })

  it('names the first problem and counts the rest in the thrown message', () => {
    const input = valid()
    input.items[1]!.requires.push('nope')
    input.items[0]!.id = 'swivel-fl'
    expect(() => calculateEstimate(input)).toThrow(/\(at items\.\d\.\w+(\.0)?\)\. And 1 more problem\./)
  })
})

describe('result contract', () => {
  it('matches EstimateResultSchema', () => {
    const result = calculateEstimate(
      estimate({
        accessSteps: frontLeftSteps,
        items: [cvJoint('approved'), swivel('pending'), item('fee', 'declined', [fee(450, '0')])],
        discount: { kind: 'percent', value: '5' },
        deposit: { kind: 'parts' },
      }),
    )
    const parsed = EstimateResultSchema.safeParse(result)
    expect(parsed.success, JSON.stringify(parsed.error?.issues)).toBe(true)
    expect(result).toMatchObject({ currency: 'GBP', exponent: 2, minimumCharge: 30 })
    expect(result.items.map((i) => [i.id, i.number, i.decision])).toEqual([
      ['cv-fl', 1, 'approved'],
      ['swivel-fl', 2, 'pending'],
      ['fee', 3, 'declined'],
    ])
    expect(result.approved.lines.map((l) => l.itemId)).toEqual(['cv-fl', 'cv-fl'])
    expect(result.proposed.lines).toHaveLength(5)
  })
})
