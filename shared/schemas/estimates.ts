/**
 * The estimate as the workshop edits, sends and the customer decides on it. The engine's own
 * contract (what it prices) is in ./estimate.ts; a draft here is a superset of it that keeps
 * where each line came from and the words the customer reads.
 */
import { z } from 'zod'
import {
  AccessStepSchema,
  DecisionSchema,
  DepositPolicySchema,
  DiscountSchema,
  EstimateResultSchema,
  FeeLineSchema,
  LabourLineSchema,
  PartLineSchema,
  TaxModeSchema,
  TaxRoundingSchema,
  type EstimateInput,
} from '../estimate/contract'
import { SeveritySchema } from './severity'
import { ExplanationSchema } from './inspections'
import { listQuerySchema } from './common'

/** Ids of items and lines are made by whoever adds them (the browser or the server). */
export const DraftIdSchema = z.string().regex(/^[A-Za-z0-9_-]{1,40}$/, 'Ids are letters, digits, dashes or underscores')

const LabourCategory = z.enum(['standard', 'diagnostic', 'specialist'])

export const DraftLabourLineSchema = LabourLineSchema.extend({
  id: DraftIdSchema,
  /** The labour-time table's code when the line came from it; null for a line typed by hand. */
  operationCode: z.string().max(40).nullable().default(null),
  category: LabourCategory.nullable().default(null),
})
export const DraftPartLineSchema = PartLineSchema.extend({
  id: DraftIdSchema,
  partNumber: z.string().max(60).nullable().default(null),
})
export const DraftFeeLineSchema = FeeLineSchema.extend({ id: DraftIdSchema })
export const DraftLineSchema = z.discriminatedUnion('kind', [DraftLabourLineSchema, DraftPartLineSchema, DraftFeeLineSchema])

export const DraftItemSchema = z.strictObject({
  id: DraftIdSchema,
  /** The finding the item was built from; null for an item added by hand. */
  findingId: z.uuid().nullable().default(null),
  title: z.string().trim().min(1, 'Give the item a title').max(200),
  severity: SeveritySchema,
  /** Words for the customer beside the item ("the seal is weeping onto the brake disc"). */
  customerNote: z.string().max(2000).default(''),
  requires: z.array(DraftIdSchema).max(50).default([]),
  lines: z.array(DraftLineSchema).max(100),
})

export const EstimateDraftSchema = z.strictObject({
  items: z.array(DraftItemSchema).max(200),
  /** The access steps the labour lines name, copied from the labour-time table when a line is added. */
  accessSteps: z.array(AccessStepSchema).max(500).default([]),
  taxMode: TaxModeSchema,
  taxRounding: TaxRoundingSchema,
  discount: DiscountSchema.default(null),
  deposit: DepositPolicySchema,
  /** The last day the customer can decide on the estimate. */
  expiresOn: z.iso.date({ error: 'Enter a date such as 2026-12-31' }),
  /** A message shown above the items. */
  message: z.string().max(2000).default(''),
})

export type DraftLine = z.infer<typeof DraftLineSchema>
export type DraftLabourLine = z.infer<typeof DraftLabourLineSchema>
export type DraftPartLine = z.infer<typeof DraftPartLineSchema>
export type DraftFeeLine = z.infer<typeof DraftFeeLineSchema>
export type DraftItem = z.infer<typeof DraftItemSchema>
export type EstimateDraft = z.infer<typeof EstimateDraftSchema>
export type EstimateDraftInput = z.input<typeof EstimateDraftSchema>

/** The engine input for a draft, with one decision per item (pending when not given). */
export function draftToEngineInput(
  draft: EstimateDraft,
  currency: string,
  decisions: Readonly<Record<string, z.infer<typeof DecisionSchema>>> = {},
): EstimateInput {
  return {
    currency,
    taxMode: draft.taxMode,
    taxRounding: draft.taxRounding,
    accessSteps: draft.accessSteps,
    discount: draft.discount,
    deposit: draft.deposit,
    items: draft.items.map((item) => ({
      id: item.id,
      title: item.title,
      decision: decisions[item.id] ?? 'pending',
      requires: item.requires,
      lines: item.lines.map((line) => {
        switch (line.kind) {
          case 'labour':
            return {
              kind: 'labour',
              description: line.description,
              hours: line.hours,
              rate: line.rate,
              taxRate: line.taxRate,
              accessSteps: line.accessSteps,
            }
          case 'part':
            return {
              kind: 'part',
              description: line.description,
              quantity: line.quantity,
              unitPrice: line.unitPrice,
              taxRate: line.taxRate,
            }
          case 'fee':
            return { kind: 'fee', description: line.description, amount: line.amount, taxRate: line.taxRate }
        }
      }),
    })),
  }
}

// ---------------------------------------------------------------------------------------------
// Workshop defaults for new estimates

export const EstimateDefaultsSchema = z.strictObject({
  taxMode: TaxModeSchema,
  taxRounding: TaxRoundingSchema,
  discount: DiscountSchema,
  deposit: DepositPolicySchema,
  /** Days from sending until the customer's link and the prices expire. */
  expiryDays: z.int().min(1, 'At least one day').max(90, 'At most 90 days'),
})
export type EstimateDefaults = z.infer<typeof EstimateDefaultsSchema>

export const DEFAULT_ESTIMATE_DEFAULTS: EstimateDefaults = {
  taxMode: 'exclusive',
  taxRounding: 'per-line',
  discount: null,
  deposit: { kind: 'none' },
  expiryDays: 14,
}

// ---------------------------------------------------------------------------------------------
// A sent version: what the customer sees and decides on. Its SHA-256 is taken over the
// RFC 8785 canonical JSON of this object, so the same content always has the same hash.

export const SnapshotItemSchema = z.strictObject({
  id: z.string(),
  number: z.int().min(1),
  title: z.string(),
  severity: SeveritySchema,
  customerNote: z.string(),
  explanation: ExplanationSchema.nullable(),
  measurement: z.string().nullable(),
  photoIds: z.array(z.uuid()),
  requires: z.array(z.string()),
  lines: z.array(DraftLineSchema),
})

export const EstimateSnapshotSchema = z.strictObject({
  format: z.literal(1),
  estimateId: z.uuid(),
  number: z.int().min(1),
  /** Shown to people as "E-0042". */
  reference: z.string(),
  version: z.int().min(1),
  expiresOn: z.iso.date(),
  currency: z.string(),
  workshop: z.strictObject({
    name: z.string(),
    addressLines: z.array(z.string()),
    postcode: z.string().nullable(),
    phone: z.string().nullable(),
    email: z.string().nullable(),
    vatNumber: z.string().nullable(),
  }),
  customer: z.strictObject({ id: z.uuid(), name: z.string(), email: z.string().nullable() }),
  vehicle: z.strictObject({
    registration: z.string(),
    make: z.string(),
    model: z.string(),
    year: z.int().nullable(),
    vin: z.string().nullable(),
  }),
  message: z.string(),
  items: z.array(SnapshotItemSchema),
  accessSteps: z.array(AccessStepSchema),
  taxMode: TaxModeSchema,
  taxRounding: TaxRoundingSchema,
  discount: DiscountSchema,
  deposit: DepositPolicySchema,
})
export type EstimateSnapshot = z.infer<typeof EstimateSnapshotSchema>
export type SnapshotItem = z.infer<typeof SnapshotItemSchema>

/** The engine input a snapshot describes, with the customer's decisions. */
export function snapshotToEngineInput(
  snapshot: EstimateSnapshot,
  decisions: Readonly<Record<string, z.infer<typeof DecisionSchema>>> = {},
): EstimateInput {
  return draftToEngineInput(
    {
      items: snapshot.items.map((i) => ({
        id: i.id,
        findingId: null,
        title: i.title,
        severity: i.severity,
        customerNote: i.customerNote,
        requires: i.requires,
        lines: i.lines,
      })),
      accessSteps: snapshot.accessSteps,
      taxMode: snapshot.taxMode,
      taxRounding: snapshot.taxRounding,
      discount: snapshot.discount,
      deposit: snapshot.deposit,
      expiresOn: snapshot.expiresOn,
      message: snapshot.message,
    },
    snapshot.currency,
    decisions,
  )
}

export function estimateReference(number: number): string {
  return `E-${String(number).padStart(4, '0')}`
}

// ---------------------------------------------------------------------------------------------
// Status words. Our own plain names; the order is the usual path of an estimate.

export const estimateStatuses = ['draft', 'sent', 'opened', 'confirmed', 'deposit_paid', 'withdrawn', 'expired'] as const
export const EstimateStatusSchema = z.enum(estimateStatuses)
export type EstimateStatus = z.infer<typeof EstimateStatusSchema>

/** What an estimate's status is decided from: the estimate, its latest version, that version's confirmation and deposit. */
export interface EstimateStatusFacts {
  withdrawn: boolean
  /** Whether any version has been sent. */
  sent: boolean
  depositStatus: 'awaiting_payment' | 'paid' | 'refunded' | null
  confirmed: boolean
  /** The version's decision day has ended in the workshop's time zone. */
  expired: boolean
  opened: boolean
}

/**
 * An estimate's status. The one rule in TypeScript; its SQL twin (server/modules/estimates/estimate-status.sql.ts)
 * lets lists filter and sort on it, and a test checks that the two agree on every combination of facts.
 */
export function estimateStatusOf(f: EstimateStatusFacts): EstimateStatus {
  if (f.withdrawn) return 'withdrawn'
  if (!f.sent) return 'draft'
  return sentEstimateStatusOf(f)
}

/** The status of an estimate the customer has been sent (the portal never sees a draft). */
export function sentEstimateStatusOf(f: Omit<EstimateStatusFacts, 'sent'>): Exclude<EstimateStatus, 'draft'> {
  if (f.withdrawn) return 'withdrawn'
  if (f.depositStatus === 'paid' || f.depositStatus === 'refunded') return 'deposit_paid'
  if (f.confirmed) return 'confirmed'
  if (f.expired) return 'expired'
  if (f.opened) return 'opened'
  return 'sent'
}

export const estimateStatusLabels: Record<EstimateStatus, string> = {
  draft: 'Draft — not sent',
  sent: 'Sent',
  opened: 'Opened by the customer',
  confirmed: 'Confirmed by the customer',
  deposit_paid: 'Deposit paid',
  withdrawn: 'Withdrawn',
  expired: 'Expired',
}

export const emailStatuses = ['queued', 'sent', 'failed'] as const
export const EmailStatusSchema = z.enum(emailStatuses)
export type EmailStatus = z.infer<typeof EmailStatusSchema>

export const EstimateEmailSchema = z.object({
  id: z.uuid(),
  kind: z.string(),
  to: z.string(),
  subject: z.string(),
  status: EmailStatusSchema,
  attempts: z.int(),
  lastError: z.string().nullable(),
  queuedAt: z.string(),
  sentAt: z.string().nullable(),
})
export type EstimateEmail = z.infer<typeof EstimateEmailSchema>

export const EstimateVersionSummarySchema = z.object({
  id: z.uuid(),
  version: z.int(),
  hash: z.string(),
  sentAt: z.string(),
  expiresOn: z.string(),
  supersededAt: z.string().nullable(),
  openedAt: z.string().nullable(),
  confirmedAt: z.string().nullable(),
  proposedGross: z.int(),
})
export type EstimateVersionSummary = z.infer<typeof EstimateVersionSummarySchema>

export const ItemDecisionSchema = z.object({ itemId: z.string(), decision: DecisionSchema, decidedAt: z.string() })
export type ItemDecision = z.infer<typeof ItemDecisionSchema>

export const EstimateSummarySchema = z.object({
  id: z.uuid(),
  number: z.int(),
  reference: z.string(),
  status: EstimateStatusSchema,
  jobId: z.uuid(),
  customerName: z.string(),
  registration: z.string(),
  currency: z.string(),
  /** Every item as if approved, from the latest sent version (or the draft before sending). */
  proposedGross: z.int(),
  /** What the customer approved on the current version; null until they decide. */
  approvedGross: z.int().nullable(),
  depositMinor: z.int().nullable(),
  hasUnsentChanges: z.boolean(),
  latestVersion: z.int().nullable(),
  updatedAt: z.string(),
})
export type EstimateSummary = z.infer<typeof EstimateSummarySchema>

export const EstimateListQuerySchema = listQuerySchema(['number', 'updatedAt', 'customerName', 'proposedGross'] as const).extend({
  status: EstimateStatusSchema.optional(),
  jobId: z.uuid().optional(),
})
export type EstimateListQuery = z.infer<typeof EstimateListQuerySchema>

export const FindingChoiceSchema = z.object({
  id: z.uuid(),
  title: z.string(),
  severity: SeveritySchema,
  position: z.string(),
  measurement: z.string().nullable(),
  /** Items of this estimate's draft already built from the finding. */
  usedByItemIds: z.array(z.string()),
})
export type FindingChoice = z.infer<typeof FindingChoiceSchema>

export const EstimateDetailSchema = z.object({
  id: z.uuid(),
  number: z.int(),
  reference: z.string(),
  status: EstimateStatusSchema,
  currency: z.string(),
  job: z.object({ id: z.uuid(), concern: z.string(), vehicleGroup: z.string().nullable() }),
  customer: z.object({ id: z.uuid(), name: z.string(), email: z.string().nullable() }),
  vehicle: z.object({ id: z.uuid(), registration: z.string(), make: z.string(), model: z.string() }),
  draft: EstimateDraftSchema,
  /** Increases with every saved change; a save names the revision it started from. */
  revision: z.int(),
  hasUnsentChanges: z.boolean(),
  versions: z.array(EstimateVersionSummarySchema),
  /** Decisions on the latest sent version. */
  decisions: z.array(ItemDecisionSchema),
  /** The engine's figures for the latest version with the customer's decisions; null before sending. */
  decided: EstimateResultSchema.nullable(),
  emails: z.array(EstimateEmailSchema),
  findings: z.array(FindingChoiceSchema),
  withdrawnAt: z.string().nullable(),
  /** Things the advisor should know about the last change ("the suggested part X is not in your parts list"). */
  notices: z.array(z.string()).default([]),
  createdAt: z.string(),
  updatedAt: z.string(),
})
export type EstimateDetail = z.infer<typeof EstimateDetailSchema>

// ---------------------------------------------------------------------------------------------
// Requests

export const CreateEstimateSchema = z.strictObject({
  jobId: z.uuid({ error: 'Choose a job' }),
  /** Findings to turn into items straight away. */
  findingIds: z.array(z.uuid()).max(100).default([]),
})
export type CreateEstimate = z.infer<typeof CreateEstimateSchema>

export const SaveDraftSchema = z.strictObject({
  revision: z.int().min(0),
  draft: EstimateDraftSchema,
})
export type SaveDraft = z.infer<typeof SaveDraftSchema>

export const AddFindingsSchema = z.strictObject({
  revision: z.int().min(0),
  findingIds: z.array(z.uuid()).min(1, 'Choose at least one finding').max(100),
})
export type AddFindings = z.infer<typeof AddFindingsSchema>

export const SendEstimateSchema = z.strictObject({
  revision: z.int().min(0),
})
export type SendEstimate = z.infer<typeof SendEstimateSchema>

export const VersionParamsSchema = z.object({ id: z.uuid({ error: 'Not a valid id' }), version: z.coerce.number().int().min(1) })
export const EmailParamsSchema = z.object({ id: z.uuid({ error: 'Not a valid id' }), emailId: z.uuid({ error: 'Not a valid id' }) })
