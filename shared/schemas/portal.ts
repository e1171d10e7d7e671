/**
 * The customer's portal: the estimate link, reading an estimate, deciding item by item, asking
 * questions, confirming and paying the deposit. Every path below is under /api.
 *
 * Refusals use the usual error body `{ error: { code, message, issues?, details? } }`; the portal
 * adds `details` where the page needs more than a code to offer the next step (a fresh link, the
 * latest version). Their shapes are `LinkRefusalDetailsSchema` and `SupersededDetailsSchema`.
 */
import { z } from 'zod'
import { CustomerPrincipalSchema } from './auth'
import { DecisionSchema, EstimateResultSchema } from '../estimate/contract'
import { EstimateSnapshotSchema, EstimateStatusSchema } from './estimates'

const Id = z.uuid({ error: 'Not a valid id' })
const Minor = z.int().min(0)
/** ISO 8601 date-time strings as the server sends them. */
const When = z.string()

// ---------------------------------------------------------------------------------------------
// The link

/**
 * The token from `/portal/open?token=…`. The page sends it in the body (never in a URL of its
 * own) and removes it from the address bar once it has been read.
 */
export const LinkTokenSchema = z.string().trim().min(20, 'This link is incomplete').max(200, 'This link is not one of ours')

/** POST /api/portal/open — anyone. Signs the link's customer in (switching from anyone else). */
export const OpenLinkSchema = z.strictObject({ token: LinkTokenSchema })
export type OpenLink = z.infer<typeof OpenLinkSchema>

/** 200 answer of POST /api/portal/open: go to the estimate page of `estimateId`. */
export const OpenLinkResponseSchema = z.object({
  estimateId: Id,
  /** The version the link was sent for (the latest one: older links are refused). */
  version: z.int().min(1),
  /** The customer now signed in, as GET /api/auth/me would answer. */
  user: CustomerPrincipalSchema,
})
export type OpenLinkResponse = z.infer<typeof OpenLinkResponseSchema>

/**
 * Why a link does not open. `link_invalid` (400): not a token we issued — nothing to renew.
 * The others answer 410 with `LinkRefusalDetailsSchema` in `error.details`:
 * - `link_expired`: the link or the estimate's decision date has passed;
 * - `link_superseded`: the workshop has sent a newer version since;
 * - `link_revoked`: the workshop withdrew the estimate or cancelled the link.
 */
export const LinkRefusalCodeSchema = z.enum(['link_invalid', 'link_expired', 'link_revoked', 'link_superseded'])
export type LinkRefusalCode = z.infer<typeof LinkRefusalCodeSchema>

export const LinkRefusalDetailsSchema = z.object({
  /** A version newer than the link's exists (it may itself have expired or been withdrawn). */
  newerVersion: z.boolean(),
  /** The estimate can still be decided on, so asking for a fresh link is worth offering. */
  renewable: z.boolean(),
})
export type LinkRefusalDetails = z.infer<typeof LinkRefusalDetailsSchema>

/**
 * POST /api/portal/estimate-links/renew — anyone, rate-limited. Sends a fresh link for the latest
 * live version to the customer's e-mail address on record. Always answers 202 with the same
 * words, whatever the token, so the answer says nothing about it.
 */
export const RenewLinkSchema = z.strictObject({ token: LinkTokenSchema })
export type RenewLink = z.infer<typeof RenewLinkSchema>

export const RenewLinkResponseSchema = z.object({ message: z.string() })
export type RenewLinkResponse = z.infer<typeof RenewLinkResponseSchema>

// ---------------------------------------------------------------------------------------------
// Reading

export const PortalEstimateParamsSchema = z.object({ id: Id })
export const PortalItemParamsSchema = z.object({ id: Id, itemId: z.string().min(1).max(40) })
export const PortalPhotoParamsSchema = z.object({ id: Id, photoId: Id })

/**
 * GET /api/portal/estimates/:id query. Without `version` the latest sent version is shown; an
 * older one can be read (what the customer confirmed earlier) but not decided on.
 */
export const PortalEstimateQuerySchema = z.object({ version: z.coerce.number().int().min(1).optional() })
export type PortalEstimateQuery = z.infer<typeof PortalEstimateQuerySchema>

/** Where the customer's estimate stands, in the staff app's own status words (never 'draft'). */
export const PortalEstimateStatusSchema = EstimateStatusSchema.exclude(['draft'])
export type PortalEstimateStatus = z.infer<typeof PortalEstimateStatusSchema>

/** One row of GET /api/portal/estimates (customerOnly): the customer's sent estimates, newest first. */
export const PortalEstimateSummarySchema = z.object({
  id: Id,
  reference: z.string(),
  workshopName: z.string(),
  vehicle: z.object({ registration: z.string(), make: z.string(), model: z.string() }),
  latestVersion: z.int().min(1),
  status: PortalEstimateStatusSchema,
  sentAt: When,
  /** The last day to decide (YYYY-MM-DD). */
  expiresOn: z.iso.date(),
  currency: z.string(),
  /** Every item as if approved. */
  proposedGross: Minor,
  /** What was confirmed on the latest version; null until confirmed. */
  approvedGross: Minor.nullable(),
})
export type PortalEstimateSummary = z.infer<typeof PortalEstimateSummarySchema>

export const PortalEstimateListSchema = z.object({ items: z.array(PortalEstimateSummarySchema) })
export type PortalEstimateList = z.infer<typeof PortalEstimateListSchema>

/** The confirmation record, as it was stored. */
export const PortalConfirmationSchema = z.object({
  id: Id,
  confirmedAt: When,
  versionHash: z.string(),
  decisions: z.record(z.string(), z.enum(['approved', 'declined'])),
  consents: z.object({ startWithinCancellationPeriod: z.boolean(), cancellationInformationShown: z.boolean() }),
  approvedGross: Minor,
  depositMinor: Minor,
})
export type PortalConfirmation = z.infer<typeof PortalConfirmationSchema>

/**
 * GET /api/portal/estimates/:id/deposit (customerOnly) — also inside the estimate. The return
 * page polls it: the provider's signed webhook, not the redirect, turns it to 'paid'.
 * - not_due: nothing confirmed yet, or the confirmation asks for no deposit;
 * - awaiting_payment: confirmed with a deposit that is not paid yet;
 * - paid / refunded: as the payment provider reported.
 */
export const DepositStatusSchema = z.enum(['not_due', 'awaiting_payment', 'paid', 'refunded'])
export type DepositStatus = z.infer<typeof DepositStatusSchema>

export const PortalDepositSchema = z.object({
  status: DepositStatusSchema,
  /** The deposit asked for on the confirmation; 0 when none is due. */
  amountMinor: Minor,
  currency: z.string(),
  paidAt: When.nullable(),
  refundedMinor: Minor.nullable(),
  refundedAt: When.nullable(),
})
export type PortalDeposit = z.infer<typeof PortalDepositSchema>

/** A question the customer asked on an item, with the workshop's answer once given. */
export const PortalQuestionSchema = z.object({
  id: Id,
  itemId: z.string(),
  /** The version the question was asked on. */
  version: z.int().min(1),
  question: z.string(),
  answer: z.string().nullable(),
  askedAt: When,
  answeredAt: When.nullable(),
})
export type PortalQuestion = z.infer<typeof PortalQuestionSchema>

/**
 * What the law asks the trader to show with the decision (UK defaults). The texts are our own
 * plain wording, general guidance only; `notice` says so and must be shown with them.
 */
export const CancellationInfoSchema = z.object({
  /** The trader's identity and address, from the sent version. */
  trader: z.object({
    name: z.string(),
    addressLines: z.array(z.string()),
    postcode: z.string().nullable(),
    phone: z.string().nullable(),
    email: z.string().nullable(),
    vatNumber: z.string().nullable(),
  }),
  periodDays: z.int().min(0),
  /** Paragraphs explaining the cancellation period and how to cancel. */
  periodText: z.array(z.string()),
  /** Words beside the separate, unticked box asking for work to start within the period. */
  startWithinPeriodText: z.string(),
  /** Our plain wording of the content of a model cancellation form, with the trader filled in. */
  modelForm: z.object({ title: z.string(), lines: z.array(z.string()) }),
  /** "General guidance, not legal advice; …" — always shown with the texts above. */
  notice: z.string(),
})
export type CancellationInfo = z.infer<typeof CancellationInfoSchema>

/**
 * GET /api/portal/estimates/:id (customerOnly; another customer's estimate is 404).
 * Items are grouped by severity on the page; `snapshot.items` keep the workshop's order and
 * numbers. Photos load from `/api/portal/estimates/:id/photos/:photoId` (and `/thumb`), the PDF
 * from `/api/portal/estimates/:id/pdf`.
 */
export const PortalEstimateSchema = z.object({
  id: Id,
  reference: z.string(),
  status: PortalEstimateStatusSchema,
  /** The version shown (the latest unless `?version=` asked for another). */
  version: z.int().min(1),
  latestVersion: z.int().min(1),
  /** The version shown has been replaced by a newer one: read-only. */
  superseded: z.boolean(),
  /** Its decision date has passed: read-only. */
  expired: z.boolean(),
  /** The workshop withdrew the estimate: read-only. */
  withdrawn: z.boolean(),
  /** Items can be decided and the estimate confirmed now. */
  canDecide: z.boolean(),
  /** The SHA-256 of what is shown; confirming sends it back. */
  hash: z.string(),
  sentAt: When,
  snapshot: EstimateSnapshotSchema,
  /** One entry per item of the snapshot; 'pending' until the customer decides. */
  decisions: z.record(z.string(), DecisionSchema),
  /** The engine's figures for those decisions (the server's figures are the truth). */
  result: EstimateResultSchema,
  confirmation: PortalConfirmationSchema.nullable(),
  deposit: PortalDepositSchema,
  questions: z.array(PortalQuestionSchema),
  cancellation: CancellationInfoSchema,
})
export type PortalEstimate = z.infer<typeof PortalEstimateSchema>

// ---------------------------------------------------------------------------------------------
// Deciding

/**
 * PUT /api/portal/estimates/:id/decisions/:itemId (customerOnly). Saved as made. Refusals:
 * - 409 `superseded` with `SupersededDetailsSchema` when `version` is not the latest;
 * - 409 `confirmed` once the version is confirmed;
 * - 410 `expired` / `withdrawn`;
 * - 422 `requires`: an approved item needs every item it names in `requires` approved too. Approving
 *   an item whose required item is not approved, or declining (or un-deciding) an item an approved
 *   item needs, is refused with a message naming the other item in words; nothing is changed behind
 *   the customer's back.
 */
export const PutDecisionSchema = z.strictObject({
  version: z.int().min(1),
  decision: DecisionSchema,
})
export type PutDecision = z.infer<typeof PutDecisionSchema>

export const SupersededDetailsSchema = z.object({ latestVersion: z.int().min(1) })
export type SupersededDetails = z.infer<typeof SupersededDetailsSchema>

/** 200 answer of a decision: every item's decision and the engine's full figures after it. */
export const DecisionResponseSchema = z.object({
  version: z.int().min(1),
  decisions: z.record(z.string(), DecisionSchema),
  result: EstimateResultSchema,
})
export type DecisionResponse = z.infer<typeof DecisionResponseSchema>

// ---------------------------------------------------------------------------------------------
// Questions

/** POST /api/portal/estimates/:id/questions (customerOnly) → 201 PortalQuestion. The workshop is e-mailed. */
export const AskQuestionSchema = z.strictObject({
  itemId: z.string().min(1).max(40),
  question: z.string().trim().min(1, 'Type your question').max(2000, 'Keep it under 2,000 characters'),
})
export type AskQuestion = z.infer<typeof AskQuestionSchema>

/** GET /api/estimates/:id/questions (staff, estimates:read) → { items: StaffQuestion[] }, oldest first. */
export const StaffQuestionSchema = PortalQuestionSchema.extend({
  itemTitle: z.string(),
  itemNumber: z.int().min(1),
  customerName: z.string(),
  answeredBy: z.object({ id: Id, name: z.string() }).nullable(),
})
export type StaffQuestion = z.infer<typeof StaffQuestionSchema>

export const StaffQuestionListSchema = z.object({ items: z.array(StaffQuestionSchema) })
export type StaffQuestionList = z.infer<typeof StaffQuestionListSchema>

export const QuestionParamsSchema = z.object({ id: Id, questionId: Id })

/**
 * POST /api/estimates/:id/questions/:questionId/answer (staff, estimates:write) → 200 StaffQuestion.
 * The customer is e-mailed the answer with a fresh link to the current version. Answering again
 * replaces the answer (409 `already_answered` is not used: a correction is allowed).
 */
export const AnswerQuestionSchema = z.strictObject({
  answer: z.string().trim().min(1, 'Type your answer').max(4000, 'Keep it under 4,000 characters'),
})
export type AnswerQuestion = z.infer<typeof AnswerQuestionSchema>

// ---------------------------------------------------------------------------------------------
// Confirming

/**
 * POST /api/portal/estimates/:id/confirm (customerOnly). Every item must be decided (422
 * `undecided` listing them in words). Declining every item is allowed: the refusal is recorded
 * with a total of 0 and no deposit. Refusals as for decisions (409 superseded/410), plus 422
 * `hash_mismatch` when the page showed different content. Confirming an already confirmed
 * version with the same hash answers 200 with the existing record (the first answer is 201).
 */
export const ConfirmEstimateSchema = z.strictObject({
  version: z.int().min(1),
  hash: z.string().regex(/^[0-9a-f]{64}$/, 'Not a content hash'),
  consents: z.strictObject({
    /** The separate, unticked box: start work within the cancellation period. */
    startWithinCancellationPeriod: z.boolean(),
    cancellationInformationShown: z.literal(true, { error: 'Read the cancellation information first' }),
  }),
})
export type ConfirmEstimate = z.infer<typeof ConfirmEstimateSchema>

export const ConfirmResponseSchema = z.object({
  confirmationId: Id,
  /** The deposit due in minor units; 0 when none. */
  depositDue: Minor,
  /** 'pay': go to the deposit checkout; 'done': nothing more to do. */
  next: z.enum(['pay', 'done']),
})
export type ConfirmResponse = z.infer<typeof ConfirmResponseSchema>

// ---------------------------------------------------------------------------------------------
// Paying

/**
 * POST /api/portal/estimates/:id/deposit/checkout (customerOnly, no body) → { url }: send the
 * browser there. 409 `not_confirmed` before confirming, `no_deposit_due`, `already_paid`.
 * The provider returns the customer to `/portal/estimates/:id/paid?session_id=…` (poll
 * GET …/deposit until 'paid') or, on cancel, to `/portal/estimates/:id`.
 */
export const CheckoutResponseSchema = z.object({ url: z.url() })
export type CheckoutResponse = z.infer<typeof CheckoutResponseSchema>
