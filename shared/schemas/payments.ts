import { z } from 'zod'

export const depositStatuses = ['awaiting_payment', 'paid', 'refunded'] as const
export const DepositStatusSchema = z.enum(depositStatuses)
export type DepositStatus = z.infer<typeof DepositStatusSchema>

/** A deposit as staff and the customer's pages see it. Money is integer minor units of `currency`. */
export const DepositSchema = z.object({
  id: z.uuid(),
  confirmationId: z.uuid(),
  status: DepositStatusSchema,
  amountMinor: z.int(),
  currency: z.string(),
  paidAt: z.string().nullable(),
  refundedMinor: z.int().nullable(),
  refundedAt: z.string().nullable(),
})
export type Deposit = z.infer<typeof DepositSchema>

export const StartCheckoutResultSchema = z.object({ url: z.url(), sessionId: z.string() })
export type StartCheckoutResult = z.infer<typeof StartCheckoutResultSchema>

/**
 * Where a payment stands when the customer comes back from the payment page. Only the provider's
 * signed webhook makes a deposit `paid`; until it has, a page the provider reports as paid is
 * `confirming`.
 */
export const checkoutStates = ['open', 'expired', 'confirming', 'paid', 'refunded'] as const
export const CheckoutStatusSchema = z.object({
  state: z.enum(checkoutStates),
  deposit: DepositSchema,
})
export type CheckoutStatus = z.infer<typeof CheckoutStatusSchema>
