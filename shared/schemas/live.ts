import { z } from 'zod'
import { EstimateStatusSchema } from './estimates'

/**
 * What staff browsers hear about as it happens. Kept small: PostgreSQL refuses NOTIFY payloads of
 * 8,000 bytes or more, and the browser fetches the full record when it needs it.
 */
export const LiveEventSchema = z.object({
  type: z.enum([
    'estimate.changed',
    'estimate.sent',
    'estimate.opened',
    'estimate.decision',
    'estimate.confirmed',
    'estimate.deposit_paid',
    'estimate.deposit_refunded',
    'estimate.question',
    'estimate.withdrawn',
    'email.status',
  ]),
  workshopId: z.uuid(),
  estimateId: z.uuid(),
  status: EstimateStatusSchema.optional(),
  /** Words for a toast ("Rhian Calloway approved item 2"). */
  summary: z.string().max(300).optional(),
  at: z.string(),
})
export type LiveEvent = z.infer<typeof LiveEventSchema>

export const LIVE_CHANNEL = 'tickover_live'
