import { z } from 'zod'
import { readingPattern } from '../decimal'
import { assessStands, capacityBases } from '../inspection/stands'
import { SeveritySchema } from './severity'

/** Decimal numbers travel as strings ("45", "0.125") so no binary float ever rounds a measurement. */
export const DecimalStringSchema = z.string().trim().regex(readingPattern, 'Enter a number, like 12 or 0.5')

export const areaCodes = ['swivel-housings', 'cv-joints', 'prop-shafts', 'axle-differentials', 'transfer-box', 'half-shafts-hubs'] as const
export const AreaCodeSchema = z.enum(areaCodes)
export type AreaCode = z.infer<typeof AreaCodeSchema>
export const areaLabels: Record<AreaCode, string> = {
  'swivel-housings': 'Swivel housings',
  'cv-joints': 'CV joints',
  'prop-shafts': 'Prop shafts',
  'axle-differentials': 'Axle differentials',
  'transfer-box': 'Transfer box',
  'half-shafts-hubs': 'Half shafts and hubs',
}

export const positions = ['left', 'right', 'front', 'rear', 'none'] as const
export const PositionSchema = z.enum(positions)
export type Position = z.infer<typeof PositionSchema>
export const positionLabels: Record<Position, string> = { left: 'Left', right: 'Right', front: 'Front', rear: 'Rear', none: '' }

export const guidedTests = ['backlash', 'diff-operation', 'centre-diff', 'slider-orientation'] as const
export const GuidedTestSchema = z.enum(guidedTests)
export type GuidedTest = z.infer<typeof GuidedTestSchema>

const ChoiceOptionSchema = z.object({ value: z.string().min(1).max(40), label: z.string().min(1).max(80), severity: SeveritySchema })

/** A measurement's rule: the first band whose `above` the value exceeds gives the severity; none → ok. */
const ThresholdSchema = z.object({ above: DecimalStringSchema, severity: SeveritySchema })

export const CheckInputSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('choice'), options: z.array(ChoiceOptionSchema).min(2).max(8) }),
  z.object({ kind: z.literal('measurement'), unit: z.string().min(1).max(12), thresholds: z.array(ThresholdSchema).max(4) }),
  z.object({ kind: z.literal('pass-fail'), failSeverity: SeveritySchema }),
  z.object({
    kind: z.literal('guided'),
    test: GuidedTestSchema,
    /** What a faulty verdict (or, for backlash, a reading over the limit) suggests. */
    faultySeverity: SeveritySchema,
    /** Backlash only: the limit in degrees at the prop flange (45° = 1/8 turn, common practice). */
    limitDegrees: DecimalStringSchema.optional(),
  }),
])
export type CheckInput = z.infer<typeof CheckInputSchema>

export const SuggestedRepairSchema = z.object({
  labour: z.array(z.string().min(1).max(40)).max(10).default([]),
  parts: z.array(z.string().min(1).max(60)).max(20).default([]),
})
export type SuggestedRepair = z.infer<typeof SuggestedRepairSchema>

export const ExplanationSchema = z.object({
  what: z.string().min(1).max(600),
  why: z.string().min(1).max(600),
  ifLeft: z.string().min(1).max(600),
})
export type Explanation = z.infer<typeof ExplanationSchema>

export const CheckDefinitionSchema = z.object({
  code: z.string().regex(/^[a-z0-9][a-z0-9-]{1,39}$/, 'Codes are lower-case letters, digits and dashes'),
  area: AreaCodeSchema,
  prompt: z.string().min(1).max(200),
  help: z.string().max(800).optional(),
  /** Each position is checked separately (a swivel housing on each side; a prop shaft front and rear). */
  positions: z.array(PositionSchema).min(1).max(2),
  underVehicle: z.boolean(),
  input: CheckInputSchema,
  findingTitle: z.string().min(1).max(120),
  explanation: ExplanationSchema,
  suggestedRepair: SuggestedRepairSchema,
})
export type CheckDefinition = z.infer<typeof CheckDefinitionSchema>

export const TemplateDefinitionSchema = z.object({ checks: z.array(CheckDefinitionSchema).min(1).max(200) }).superRefine((d, ctx) => {
  const seen = new Set<string>()
  d.checks.forEach((c, i) => {
    if (seen.has(c.code)) ctx.addIssue({ code: 'custom', path: ['checks', i, 'code'], message: `The code ${c.code} is used twice` })
    seen.add(c.code)
  })
})
export type TemplateDefinition = z.infer<typeof TemplateDefinitionSchema>

export const CheckTemplateSchema = z.object({
  id: z.uuid(),
  name: z.string(),
  vehicleGroup: z.string().nullable(),
  definition: TemplateDefinitionSchema,
  basedOnId: z.uuid().nullable(),
  archived: z.boolean(),
  updatedAt: z.string(),
})
export type CheckTemplate = z.infer<typeof CheckTemplateSchema>

export const CheckTemplateInputSchema = z.object({
  name: z.string().trim().min(1, 'Give the template a name').max(120),
  vehicleGroup: z.string().trim().max(60).nullable().optional(),
  definition: TemplateDefinitionSchema,
})
export type CheckTemplateInput = z.infer<typeof CheckTemplateInputSchema>

/** Values the technician records, by the check's input kind. */
export const DiffOperationStepsSchema = z.object({
  propTurnsWheelsSameWay: z.enum(['yes', 'no']),
  heldPropOtherWheelOpposite: z.enum(['yes', 'no']),
  heldWheelPropTurns: z.enum(['yes', 'no']),
  wheelStiff: z.enum(['yes', 'no']),
  propWontStop: z.enum(['yes', 'no']),
})
export type DiffOperationSteps = z.infer<typeof DiffOperationStepsSchema>

export const CentreDiffStepsSchema = z.object({
  unlockedOutputsIndependent: z.enum(['yes', 'no']),
  lockedOutputsTogether: z.enum(['yes', 'no']),
  largeLagBetweenOutputs: z.enum(['yes', 'no']),
})
export type CentreDiffSteps = z.infer<typeof CentreDiffStepsSchema>

export const ResultValueSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('choice'), value: z.string().min(1).max(40) }),
  z.object({ kind: z.literal('measurement'), value: DecimalStringSchema }),
  z.object({ kind: z.literal('pass-fail'), passed: z.boolean() }),
  z.object({ kind: z.literal('backlash'), value: DecimalStringSchema, unit: z.enum(['degrees', 'turn']) }),
  z.object({ kind: z.literal('diff-operation'), steps: DiffOperationStepsSchema }),
  z.object({ kind: z.literal('centre-diff'), steps: CentreDiffStepsSchema }),
  z.object({ kind: z.literal('slider-orientation'), towardGearbox: z.boolean() }),
  z.object({ kind: z.literal('not-checked'), reason: z.string().trim().min(1, 'Say why it could not be checked').max(200) }),
])
export type ResultValue = z.infer<typeof ResultValueSchema>

export const SafetyCheckSchema = z
  .object({
    standsOnFirmLevelGround: z.literal(true, { error: 'Confirm the ground is firm and level' }),
    atLiftingPoints: z.literal(true, { error: 'Confirm the stands are at proper lifting points' }),
    wheelsChocked: z.literal(true, { error: 'Confirm the wheels left on the ground are chocked' }),
    notOnJackAlone: z.literal(true, { error: 'Confirm nothing is held up by a jack alone' }),
    standCapacityKg: z.coerce.number().int().positive('Enter the stands’ rated capacity').max(100_000),
    capacityBasis: z.enum(capacityBases),
    standCount: z.coerce.number().int().min(2, 'At least two stands').max(8),
    axleLoadKg: z.coerce.number().int().positive('Enter the axle load').max(100_000),
  })
  .superRefine((s, ctx) => {
    const stands = assessStands(s)
    if (!stands.covered) ctx.addIssue({ code: 'custom', path: ['standCapacityKg'], message: stands.message })
  })
export type SafetyCheck = z.infer<typeof SafetyCheckSchema>

export const RecordResultSchema = z.object({
  checkCode: z.string().min(1).max(40),
  position: PositionSchema,
  value: ResultValueSchema,
  note: z.string().trim().max(1000).optional(),
})
export type RecordResult = z.infer<typeof RecordResultSchema>

export const InspectionResultSchema = RecordResultSchema.extend({
  id: z.uuid(),
  suggestedSeverity: SeveritySchema.nullable(),
  detail: z.string(),
  recordedAt: z.string(),
  recordedBy: z.string().nullable(),
})
export type InspectionResult = z.infer<typeof InspectionResultSchema>

export const InspectionSchema = z.object({
  id: z.uuid(),
  jobId: z.uuid(),
  templateName: z.string(),
  definition: TemplateDefinitionSchema,
  status: z.enum(['safety', 'in_progress', 'finished']),
  safety: SafetyCheckSchema.nullable(),
  technicianId: z.uuid().nullable(),
  technicianName: z.string().nullable(),
  notes: z.string(),
  results: z.array(InspectionResultSchema),
  startedAt: z.string(),
  finishedAt: z.string().nullable(),
})
export type Inspection = z.infer<typeof InspectionSchema>

export const StartInspectionSchema = z.object({ templateId: z.uuid().optional() })

export const FindingInputSchema = z.object({
  title: z.string().trim().min(1, 'Give the finding a title').max(120),
  severity: SeveritySchema,
  explanation: ExplanationSchema,
  measurement: z.string().trim().max(120).nullable().optional(),
  position: PositionSchema.default('none'),
  suggestedRepair: SuggestedRepairSchema.default({ labour: [], parts: [] }),
})
export type FindingInput = z.infer<typeof FindingInputSchema>

export const PhotoSchema = z.object({
  id: z.uuid(),
  width: z.number(),
  height: z.number(),
  bytes: z.number(),
  contentType: z.string(),
  url: z.string(),
  thumbUrl: z.string(),
  createdAt: z.string(),
})
export type Photo = z.infer<typeof PhotoSchema>

export const FindingSchema = FindingInputSchema.extend({
  id: z.uuid(),
  jobId: z.uuid(),
  inspectionId: z.uuid().nullable(),
  checkCode: z.string().nullable(),
  reviewed: z.boolean(),
  photos: z.array(PhotoSchema),
  createdAt: z.string(),
  updatedAt: z.string(),
})
export type Finding = z.infer<typeof FindingSchema>
