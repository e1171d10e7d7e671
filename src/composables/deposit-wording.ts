import type { ScopeResult } from '@shared/estimate/contract'

type DepositAdjustment = NonNullable<ScopeResult['depositAdjustment']>

/** Who reads the words: the advisor building the estimate, or the customer confirming it. */
export type DepositReader = 'advisor' | 'customer'

const sameForBoth = {
  'raised-to-minimum': 'The deposit is raised to the smallest amount a card payment can be.',
  'gross-below-minimum': 'The total is below the smallest card payment, so no deposit is taken.',
} as const

// The customer is told why in plain terms; the advisor knows what the usual deposit is.
const adjustmentWords: Record<DepositReader, Record<DepositAdjustment, string>> = {
  advisor: { ...sameForBoth, 'capped-at-gross': 'The deposit is capped at the total.' },
  customer: { ...sameForBoth, 'capped-at-gross': 'The deposit is the whole total, as the total is smaller than the usual deposit.' },
}

/** Why the deposit is not the one the estimate asks for, or null when it is. */
export function depositAdjustmentWords(adjustment: ScopeResult['depositAdjustment'] | undefined, reader: DepositReader): string | null {
  return adjustment ? adjustmentWords[reader][adjustment] : null
}
