import { safeCalculateEstimate } from '@shared/estimate'
import { formatMoney } from '@shared/money'
import type { Decision, EstimateResult, ItemLineResult } from '@shared/estimate/contract'
import type { SnapshotItem } from '@shared/schemas/estimates'
import { severities, type Severity } from '@shared/schemas/severity'

/** The table in shared/schemas/severity.ts lists the levels most serious first. */
const severityOrder = Object.keys(severities) as Severity[]

export interface SeverityGroup {
  severity: Severity
  items: SnapshotItem[]
}

/** Items by severity, most serious first; within a level the workshop's own order is kept. */
export function groupBySeverity(items: readonly SnapshotItem[]): SeverityGroup[] {
  return severityOrder
    .map((severity) => ({ severity, items: items.filter((i) => i.severity === severity) }))
    .filter((g) => g.items.length > 0)
}

/** "item 1 (Front hub strip)", the way the server's refusals name items. */
export function itemWords(item: Pick<SnapshotItem, 'number' | 'title'>): string {
  return `item ${item.number} (${item.title})`
}

const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1)

/**
 * What an item needs, in words. While the customer can still choose, it also says what to do, so
 * the server's refusal is the exception rather than how they find out.
 */
export function requiresWords(item: SnapshotItem, all: readonly SnapshotItem[], canDecide: boolean): string[] {
  return item.requires.flatMap((id) => {
    const needed = all.find((i) => i.id === id)
    if (!needed) return []
    return canDecide ? [`Needs ${itemWords(needed)} — approve that too.`] : [`Can only be done together with ${itemWords(needed)}.`]
  })
}

/**
 * A shared-access saving with VAT on it, priced by the engine as a one-line fee at the line's own
 * rate: the saving is in the entered basis, and customers are shown tax-inclusive figures. With
 * prices entered including VAT the saving already includes it.
 */
export function savingWithTax(saving: number, taxRate: string, result: Pick<EstimateResult, 'currency' | 'taxMode'>): number {
  if (saving === 0 || result.taxMode === 'inclusive') return saving
  const priced = safeCalculateEstimate({
    currency: result.currency,
    taxMode: result.taxMode,
    taxRounding: 'per-line',
    items: [
      {
        id: 'saving',
        title: 'Shared access saving',
        decision: 'approved',
        lines: [{ kind: 'fee', description: 'saving', amount: saving, taxRate }],
      },
    ],
  })
  return priced.success ? priced.data.approved.gross : saving
}

/** "Hub off already done for item 1 (Front hub strip) — saves £30.00", one per line that shares access. */
export function sharedAccessNotes(lines: readonly ItemLineResult[], result: Pick<EstimateResult, 'currency' | 'taxMode'>): string[] {
  return lines.flatMap((line) => {
    if (!line.note) return []
    const saving = savingWithTax(line.sharedSaving, line.taxRate, result)
    return [saving > 0 ? `${capitalise(line.note)} — saves ${formatMoney(saving, result.currency)}` : `${capitalise(line.note)}.`]
  })
}

/** The shared-access saving of every approved item, with VAT as the customer sees prices. */
export function approvedSavingWithTax(result: EstimateResult): number {
  const lines = result.items.filter((i) => i.decision === 'approved').flatMap((i) => i.lines.filter((l) => l.sharedSaving > 0))
  if (lines.length === 0) return 0
  const priced = safeCalculateEstimate({
    currency: result.currency,
    taxMode: result.taxMode,
    taxRounding: 'per-line',
    items: lines.map((l, n) => ({
      id: `saving-${n}`,
      title: 'Shared access saving',
      decision: 'approved',
      lines: [{ kind: 'fee', description: 'saving', amount: l.sharedSaving, taxRate: l.taxRate }],
    })),
  })
  return priced.success ? priced.data.approved.gross : result.approved.sharedSaving
}

export const decisionWords: Record<Decision, string> = {
  approved: 'Approved',
  declined: 'Declined',
  pending: 'Not decided yet',
}

/** Digits and a leading plus, for a tel: link; the "(0)" of "+44 (0)1632" is not dialled from abroad. */
export function telHref(phone: string): string {
  return `tel:${phone.replace(/\(0\)/g, '').replace(/[^\d+]/g, '')}`
}
