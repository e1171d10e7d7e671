import { z } from 'zod'
import { hundredthsPattern, toHundredths } from '../decimal'
import { optionalText } from './common'

export const labourSystems = ['front_axle', 'rear_axle', 'prop_shafts', 'transfer_box', 'steering', 'hubs_bearings'] as const
export const LabourSystemSchema = z.enum(labourSystems, { error: `Choose a system: ${labourSystems.join(', ')}` })
export type LabourSystem = z.infer<typeof LabourSystemSchema>
export const labourSystemLabels: Record<LabourSystem, string> = {
  front_axle: 'Front axle',
  rear_axle: 'Rear axle',
  prop_shafts: 'Prop shafts',
  transfer_box: 'Transfer box',
  steering: 'Steering',
  hubs_bearings: 'Hubs and bearings',
}

export const labourSides = ['left', 'right', 'both', 'none'] as const
export const LabourSideSchema = z.enum(labourSides, { error: `Choose a side: ${labourSides.join(', ')}` })
export type LabourSide = z.infer<typeof LabourSideSchema>
export const labourSideLabels: Record<LabourSide, string> = { left: 'Left', right: 'Right', both: 'Both sides', none: 'Not sided' }

export const labourCategories = ['standard', 'diagnostic', 'specialist'] as const
export const LabourCategorySchema = z.enum(labourCategories, { error: `Choose a labour category: ${labourCategories.join(', ')}` })
export type LabourCategory = z.infer<typeof LabourCategorySchema>
export const labourCategoryLabels: Record<LabourCategory, string> = {
  standard: 'Standard',
  diagnostic: 'Diagnostic',
  specialist: 'Specialist',
}

/** 9,999.99 hours in hundredths: the largest value numeric(6, 2) holds. */
const MAX_HOURS = 999_999
/** £1,000,000.00 in pence: far above any part or hourly rate, far below where integers lose precision. */
export const MAX_MINOR = 100_000_000

function decimalText(what: string, opts: { max: number; above?: number }) {
  return (
    z
      .string({ error: `Enter the ${what}` })
      .trim()
      .regex(hundredthsPattern, `Write the ${what} as a number like 1.5, with at most 2 decimal places`)
      // zod runs every check even after the pattern fails, so each refinement checks the pattern first.
      .refine((v) => !hundredthsPattern.test(v) || toHundredths(v) <= opts.max, `The ${what} is too large`)
      .refine(
        (v) => !hundredthsPattern.test(v) || opts.above === undefined || toHundredths(v) > opts.above,
        `The ${what} must be more than 0`,
      )
  )
}

export const BookHoursSchema = decimalText('book time', { max: MAX_HOURS, above: 0 })
export const StepHoursSchema = decimalText('hours', { max: MAX_HOURS })
export const ClockHoursSchema = decimalText('time taken', { max: 100_00, above: 0 })
export const PercentSchema = decimalText('percentage', { max: 99_999_99 })
export const TaxRateSchema = decimalText('tax rate', { max: 100_00 })

/** Operation and access-step codes: the shop's own, upper case, no spaces. */
export const CatalogueCodeSchema = z
  .string({ error: 'Enter a code' })
  .trim()
  .toUpperCase()
  .min(1, 'Enter a code')
  .max(40, 'At most 40 characters')
  .regex(/^[A-Z0-9][A-Z0-9._/-]*$/, 'Use letters, digits and - . / _ only, starting with a letter or digit')

const MinorSchema = z.int('Use whole pence').min(0, 'Cannot be negative').max(MAX_MINOR, 'Too large')

const shortList = (what: string, max: number) =>
  z
    .array(
      z
        .string()
        .trim()
        .min(1)
        .max(60, `Each ${what} has at most 60 characters`)
        // The sign separates list entries in a CSV cell.
        .refine((v) => !v.includes('|'), `A ${what} cannot contain the | sign`),
    )
    .max(max, `At most ${max} ${what}s`)
    .default([])

// ---------------------------------------------------------------------------------------------
// Access steps

export const AccessStepInputSchema = z.object({
  code: CatalogueCodeSchema,
  name: z.string().trim().min(1, 'Enter a name').max(120),
  hours: StepHoursSchema,
  includes: z.array(CatalogueCodeSchema).max(50, 'At most 50 steps').default([]),
})
export type AccessStepInput = z.infer<typeof AccessStepInputSchema>

export const AccessStepSchema = z.object({
  id: z.uuid(),
  code: z.string(),
  name: z.string(),
  /** The step's own time, without the steps it includes. */
  hours: z.string(),
  includes: z.array(z.string()),
  /** Its own time plus every step it includes, each counted once. */
  totalHours: z.string(),
  usedBy: z.int(),
})
export type AccessStep = z.infer<typeof AccessStepSchema>

// ---------------------------------------------------------------------------------------------
// Labour operations

export const LabourOperationInputSchema = z.object({
  code: CatalogueCodeSchema,
  name: z.string().trim().min(1, 'Enter a name').max(160),
  synonyms: shortList('synonym', 20),
  system: LabourSystemSchema,
  vehicleGroups: shortList('vehicle group', 20),
  side: LabourSideSchema,
  bookHours: BookHoursSchema,
  category: LabourCategorySchema,
  accessSteps: z.array(CatalogueCodeSchema).max(20, 'At most 20 access steps').default([]),
  notes: optionalText(2000),
})
export type LabourOperationInput = z.infer<typeof LabourOperationInputSchema>

export const OperationAccessStepSchema = z.object({ code: z.string(), name: z.string(), hours: z.string(), includes: z.array(z.string()) })
export type OperationAccessStep = z.infer<typeof OperationAccessStepSchema>

export const LabourOperationSchema = z.object({
  id: z.uuid(),
  code: z.string(),
  name: z.string(),
  synonyms: z.array(z.string()),
  system: LabourSystemSchema,
  vehicleGroups: z.array(z.string()),
  side: LabourSideSchema,
  /** Book time, access steps included. */
  bookHours: z.string(),
  category: LabourCategorySchema,
  notes: z.string().nullable(),
  /** The steps in the order they are done, as listed on the operation. */
  accessSteps: z.array(OperationAccessStepSchema),
  /** Time of all access steps, each counted once. */
  accessHours: z.string(),
  /** The category's hourly rate and rate × book time, in minor units; null until the owner sets the rate. */
  rateMinor: z.int().nullable(),
  priceMinor: z.int().nullable(),
  currency: z.string(),
  archived: z.boolean(),
})
export type LabourOperation = z.infer<typeof LabourOperationSchema>

const trueFalse = z
  .enum(['true', 'false'])
  .transform((v) => v === 'true')
  .optional()

/**
 * A side narrows to operations on that side plus those that have no side (a differential), since
 * both apply to a finding on one side.
 */
export const LabourSearchQuerySchema = z.object({
  q: z.string().trim().max(200).optional(),
  vehicleGroup: z.string().trim().max(60).optional(),
  system: LabourSystemSchema.optional(),
  side: LabourSideSchema.optional(),
  archived: trueFalse,
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(20),
})
export type LabourSearchQuery = z.infer<typeof LabourSearchQuerySchema>

// ---------------------------------------------------------------------------------------------
// Parts

export const PartInputSchema = z.object({
  partNumber: z.string().trim().min(1, 'Enter the part number').max(60),
  description: z.string().trim().min(1, 'Enter a description').max(200),
  supplierRef: optionalText(60),
  costMinor: MinorSchema,
  /** Null: the price comes from the markup bands. */
  sellPriceMinor: MinorSchema.nullable().default(null),
  /** Left out: the workshop's default tax rate. */
  taxRate: TaxRateSchema.optional(),
  stockQuantity: z.int('Use a whole number').min(0, 'Cannot be negative').max(1_000_000).nullable().default(null),
})
export type PartInput = z.infer<typeof PartInputSchema>

export const PartSchema = z.object({
  id: z.uuid(),
  partNumber: z.string(),
  description: z.string(),
  supplierRef: z.string().nullable(),
  costMinor: z.int(),
  /** The fixed price, when the part has one. */
  fixedPriceMinor: z.int().nullable(),
  /** What the part sells for now (fixed, or cost through the bands); null when no band covers the cost. */
  sellPriceMinor: z.int().nullable(),
  priceSource: z.enum(['fixed', 'markup']).nullable(),
  markupPercent: z.string().nullable(),
  taxRate: z.string(),
  stockQuantity: z.int().nullable(),
  currency: z.string(),
  archived: z.boolean(),
})
export type Part = z.infer<typeof PartSchema>

export const PartSearchQuerySchema = z.object({
  q: z.string().trim().max(200).optional(),
  archived: trueFalse,
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(20),
})
export type PartSearchQuery = z.infer<typeof PartSearchQuerySchema>

// ---------------------------------------------------------------------------------------------
// Pricing

export const MarkupBandSchema = z.object({ fromCostMinor: MinorSchema, markupPercent: PercentSchema })

export const PricingInputSchema = z
  .object({
    rates: z.object({
      standard: MinorSchema.nullable(),
      diagnostic: MinorSchema.nullable(),
      specialist: MinorSchema.nullable(),
    }),
    defaultTaxRate: TaxRateSchema,
    markupBands: z.array(MarkupBandSchema).max(30, 'At most 30 bands'),
  })
  .superRefine((p, ctx) => {
    const bands = p.markupBands
    if (bands.length > 0 && bands[0]?.fromCostMinor !== 0) {
      ctx.addIssue({
        code: 'custom',
        path: ['markupBands', 0, 'fromCostMinor'],
        message: 'The first band starts at 0, so every cost has a markup',
      })
    }
    bands.forEach((band, i) => {
      const before = bands[i - 1]
      if (before && band.fromCostMinor <= before.fromCostMinor) {
        ctx.addIssue({ code: 'custom', path: ['markupBands', i, 'fromCostMinor'], message: 'Each band starts above the one before it' })
      }
    })
  })
export type PricingInput = z.infer<typeof PricingInputSchema>

export const PricingSchema = z.object({
  currency: z.string(),
  rates: z.object({ standard: z.int().nullable(), diagnostic: z.int().nullable(), specialist: z.int().nullable() }),
  defaultTaxRate: z.string(),
  markupBands: z.array(z.object({ fromCostMinor: z.int(), markupPercent: z.string() })),
})
export type Pricing = z.infer<typeof PricingSchema>

// ---------------------------------------------------------------------------------------------
// Clock time against book time

export const ClockTimeInputSchema = z.object({
  hours: ClockHoursSchema,
  jobId: z.uuid().nullable().optional(),
})
export type ClockTimeInput = z.infer<typeof ClockTimeInputSchema>

export const ClockTimeSchema = z.object({
  id: z.uuid(),
  operationId: z.uuid(),
  jobId: z.uuid().nullable(),
  technicianId: z.uuid(),
  hours: z.string(),
  recordedAt: z.string(),
})
export type ClockTime = z.infer<typeof ClockTimeSchema>

export const TimeComparisonQuerySchema = z.object({ system: LabourSystemSchema.optional() })
export type TimeComparisonQuery = z.infer<typeof TimeComparisonQuerySchema>

export const TimeComparisonRowSchema = z.object({
  operationId: z.uuid(),
  code: z.string(),
  name: z.string(),
  system: LabourSystemSchema,
  bookHours: z.string(),
  /** Median of the recorded times, to the hundredth of an hour. */
  medianHours: z.string(),
  count: z.int(),
})
export type TimeComparisonRow = z.infer<typeof TimeComparisonRowSchema>

// ---------------------------------------------------------------------------------------------
// Imports

export const catalogueTables = ['labour-operations', 'access-steps', 'parts'] as const
export type CatalogueTable = (typeof catalogueTables)[number]

/** Row 1 is the header, so the first record is row 2, as a spreadsheet numbers it. */
export const ImportIssueSchema = z.object({ row: z.int(), column: z.string().nullable(), message: z.string() })
export type ImportIssue = z.infer<typeof ImportIssueSchema>

export const ImportRowSchema = z.object({
  row: z.int(),
  /** The code or part number the row is matched on. */
  key: z.string(),
  action: z.enum(['add', 'change', 'keep']),
  /** The columns that differ from the stored record, for a change. */
  changed: z.array(z.string()),
})
export type ImportRow = z.infer<typeof ImportRowSchema>

export const ImportReportSchema = z.object({
  rows: z.array(ImportRowSchema),
  errors: z.array(ImportIssueSchema),
  summary: z.object({ added: z.int(), changed: z.int(), unchanged: z.int() }),
  /** True only when the rows were written. */
  committed: z.boolean(),
})
export type ImportReport = z.infer<typeof ImportReportSchema>

/** The largest CSV file accepted: thousands of rows fit many times over. */
export const MAX_IMPORT_BYTES = 10 * 1024 * 1024
export const MAX_IMPORT_ROWS = 20_000
