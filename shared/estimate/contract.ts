import { z } from 'zod'
import { decimalPattern, HOURS_PLACES, PERCENT_PLACES, QUANTITY_PLACES } from '../decimal'
import { isSupportedCurrency } from '../money'

/**
 * A non-negative decimal string with at most `places` places. Its upper limit is checked with
 * the other rules in prepareEstimate, which parses the value anyway; a zod refinement here
 * doubled the cost of validating a large estimate.
 */
function decimalString(places: number, what: string) {
  return z
    .string()
    .regex(decimalPattern(places), { message: `${what} must be a decimal string such as "1.5", with at most ${places} decimal places` })
}

const Hours = decimalString(HOURS_PLACES, 'Hours')
const Quantity = decimalString(QUANTITY_PLACES, 'Quantity')
const Percent = decimalString(PERCENT_PLACES, 'Percentage')
const TaxRate = decimalString(PERCENT_PLACES, 'Tax rate')

/** Integer minor units of the estimate's currency (pence, cents, yen, fils). */
const Minor = z.int().min(0)
const Code = z.string().min(1).max(100)
const Text = z.string().max(1000)

export const AccessStepSchema = z.strictObject({
  code: Code,
  /** The step's own time, without the steps it includes. */
  hours: Hours,
  includes: z.array(Code).max(1000).default([]),
  /** Optional words for notes shown to people ("hub off"); the code is used when absent. */
  label: Text.optional(),
})

export const LabourLineSchema = z.strictObject({
  kind: z.literal('labour'),
  description: Text,
  /** Book time including the access steps. */
  hours: Hours,
  /** Minor units per hour. */
  rate: Minor,
  taxRate: TaxRate,
  accessSteps: z.array(Code).max(1000).default([]),
})

export const PartLineSchema = z.strictObject({
  kind: z.literal('part'),
  description: Text,
  quantity: Quantity,
  unitPrice: Minor,
  taxRate: TaxRate,
})

export const FeeLineSchema = z.strictObject({
  kind: z.literal('fee'),
  description: Text,
  amount: Minor,
  taxRate: TaxRate,
})

export const EstimateLineSchema = z.discriminatedUnion('kind', [LabourLineSchema, PartLineSchema, FeeLineSchema])

export const DecisionSchema = z.enum(['approved', 'declined', 'pending'])

export const EstimateItemSchema = z.strictObject({
  id: Code,
  title: Text,
  decision: DecisionSchema,
  requires: z.array(Code).max(1000).default([]),
  lines: z.array(EstimateLineSchema).max(5000),
})

export const DiscountSchema = z
  .discriminatedUnion('kind', [
    z.strictObject({ kind: z.literal('percent'), value: Percent }),
    z.strictObject({ kind: z.literal('amount'), value: Minor }),
  ])
  .nullable()

export const DepositPolicySchema = z.discriminatedUnion('kind', [
  z.strictObject({ kind: z.literal('none') }),
  z.strictObject({ kind: z.literal('percent'), value: Percent }),
  z.strictObject({ kind: z.literal('fixed'), value: Minor }),
  z.strictObject({ kind: z.literal('parts') }),
])

export const TaxModeSchema = z.enum(['exclusive', 'inclusive'])
export const TaxRoundingSchema = z.enum(['per-line', 'per-invoice', 'per-invoice-down'])

/**
 * The estimate's shape alone. Unknown keys are refused rather than dropped, so a misspelt
 * optional field ("acessSteps") cannot silently price a line without its access time.
 */
export const EstimateInputShapeSchema = z.strictObject({
  currency: z.string().refine(isSupportedCurrency, { message: 'Unknown or unsupported ISO 4217 currency code' }),
  taxMode: TaxModeSchema,
  taxRounding: TaxRoundingSchema,
  accessSteps: z.array(AccessStepSchema).max(1000).default([]),
  items: z.array(EstimateItemSchema).max(5000),
  discount: DiscountSchema.default(null),
  deposit: DepositPolicySchema.default({ kind: 'none' }),
  /** The smallest card payment in minor units; defaults to the known minimum for the currency. */
  minimumCharge: Minor.optional(),
})

/**
 * The estimate's shape once parsed. The rules that tie its parts together are the engine's
 * (EstimateInputSchema in prepare.ts), so this contract does not depend on the engine.
 */
export type EstimateInput = z.infer<typeof EstimateInputShapeSchema>
/** What a caller may send: fields with defaults may be left out. */
export type EstimateInputDraft = z.input<typeof EstimateInputShapeSchema>
export type EstimateLine = z.infer<typeof EstimateLineSchema>
export type EstimateItem = z.infer<typeof EstimateItemSchema>
export type Decision = z.infer<typeof DecisionSchema>

// ---------------------------------------------------------------------------------------------
// Result. Money is integer minor units; hours and rates are decimal strings. Strict, so a test
// parsing the engine's output also catches fields the contract does not describe.

const Amount = z.int().min(0)
const DecimalText = z.string()

export const SharedStepSchema = z.strictObject({
  step: z.string(),
  /** The step's label, or its code when it has none. */
  label: z.string(),
  hours: DecimalText,
  /** The item and line that already pay for this step. */
  itemId: z.string(),
  itemNumber: z.int().min(1),
  line: z.int().min(0),
})

export const ItemLineResultSchema = z.strictObject({
  kind: z.enum(['labour', 'part', 'fee']),
  description: z.string(),
  taxRate: DecimalText,
  /** The line's price before the estimate-level discount, in the entered basis (net when exclusive, gross when inclusive). */
  amount: Amount,
  sharedHours: DecimalText,
  sharedSaving: Amount,
  shared: z.array(SharedStepSchema),
  /** Plain words for the shared access, or null when nothing is shared. */
  note: z.string().nullable(),
  net: Amount,
  tax: Amount,
  gross: Amount,
})

export const ItemResultSchema = z.strictObject({
  id: z.string(),
  number: z.int().min(1),
  title: z.string(),
  decision: DecisionSchema,
  lines: z.array(ItemLineResultSchema),
  net: Amount,
  tax: Amount,
  gross: Amount,
  sharedSaving: Amount,
})

export const ScopeLineResultSchema = z.strictObject({
  itemId: z.string(),
  line: z.int().min(0),
  kind: z.enum(['labour', 'part', 'fee']),
  taxRate: DecimalText,
  amount: Amount,
  sharedHours: DecimalText,
  sharedSaving: Amount,
  /** This line's share of the estimate-level discount. */
  discount: Amount,
  net: Amount,
  /** Rounded per line; indicative when tax is rounded per invoice (the scope's taxByRate is authoritative). */
  tax: Amount,
  gross: Amount,
})

export const TaxByRateSchema = z.strictObject({
  rate: DecimalText,
  net: Amount,
  tax: Amount,
  gross: Amount,
})

export const DepositAdjustmentSchema = z.enum(['capped-at-gross', 'raised-to-minimum', 'gross-below-minimum']).nullable()

export const ScopeResultSchema = z.strictObject({
  /** Sums of line amounts by kind, before discount, in the entered basis. */
  labour: Amount,
  parts: Amount,
  fees: Amount,
  subtotal: Amount,
  sharedSaving: Amount,
  discount: Amount,
  net: Amount,
  taxByRate: z.array(TaxByRateSchema),
  tax: Amount,
  gross: Amount,
  deposit: Amount,
  depositAdjustment: DepositAdjustmentSchema,
  lines: z.array(ScopeLineResultSchema),
})

export const EstimateResultSchema = z.strictObject({
  currency: z.string(),
  /** Decimal digits of the currency's minor unit. */
  exponent: z.int().min(0),
  taxMode: TaxModeSchema,
  taxRounding: TaxRoundingSchema,
  minimumCharge: Amount,
  items: z.array(ItemResultSchema),
  /** The items the customer has approved. */
  approved: ScopeResultSchema,
  /** Every item, as if all were approved. */
  proposed: ScopeResultSchema,
})

export type EstimateResult = z.infer<typeof EstimateResultSchema>
export type ItemResult = z.infer<typeof ItemResultSchema>
export type ItemLineResult = z.infer<typeof ItemLineResultSchema>
export type ScopeResult = z.infer<typeof ScopeResultSchema>
export type ScopeLineResult = z.infer<typeof ScopeLineResultSchema>
export type SharedStep = z.infer<typeof SharedStepSchema>
