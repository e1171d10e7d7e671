/**
 * Building blocks for editing an estimate draft in the browser: new items and lines, the labour
 * table's access steps, and the words and issue places the builder shows. Pure functions; the
 * estimate store applies them to its local copy of the draft.
 */
import type { AccessStep as CatalogueAccessStep, LabourOperation, OperationAccessStep, Part } from '@shared/schemas/catalogue'
import type { DraftFeeLine, DraftItem, DraftLabourLine, DraftPartLine, EstimateDraft } from '@shared/schemas/estimates'
import type { Severity } from '@shared/schemas/severity'

/** The settings an estimate and the workshop's defaults share. */
export type EstimatePolicy = Pick<EstimateDraft, 'taxMode' | 'taxRounding' | 'discount' | 'deposit'>

/** Ids the contract accepts (letters, digits, dashes), unique enough for one estimate without a secure context. */
export function newDraftId(prefix: 'item' | 'line'): string {
  const bytes = new Uint8Array(8)
  crypto.getRandomValues(bytes)
  return `${prefix}-${[...bytes].map((b) => b.toString(36).padStart(2, '0')).join('')}`
}

export function manualItem(title = 'New item', severity: Severity = 'soon'): DraftItem {
  return { id: newDraftId('item'), findingId: null, title, severity, customerNote: '', requires: [], lines: [] }
}

/** A labour line from the labour-time table: its book time (access included), its category's rate and its access steps. */
export function labourLineFrom(op: LabourOperation, taxRate: string): DraftLabourLine {
  return {
    id: newDraftId('line'),
    kind: 'labour',
    description: op.name,
    hours: op.bookHours,
    rate: op.rateMinor ?? 0,
    taxRate,
    accessSteps: op.accessSteps.map((s) => s.code),
    operationCode: op.code,
    category: op.category,
  }
}

/** One of the part at its current sell price; null when the catalogue has no price for it yet. */
export function partLineFrom(part: Part): DraftPartLine | null {
  if (part.sellPriceMinor === null) return null
  return {
    id: newDraftId('line'),
    kind: 'part',
    description: part.description,
    quantity: '1',
    unitPrice: part.sellPriceMinor,
    taxRate: part.taxRate,
    partNumber: part.partNumber,
  }
}

export function feeLine(taxRate: string, description = ''): DraftFeeLine {
  return { id: newDraftId('line'), kind: 'fee', description, amount: 0, taxRate }
}

type StepSource = Pick<OperationAccessStep, 'code' | 'name' | 'hours' | 'includes'>

/**
 * The draft's access steps with an operation's steps added, and every step those include (from the
 * workshop's step graph, when it is at hand): the engine needs each included step to share time.
 * A step already on the draft is kept as it is, so an earlier line's figures do not shift.
 */
export function mergeAccessSteps(
  current: EstimateDraft['accessSteps'],
  added: readonly StepSource[],
  graph: readonly CatalogueAccessStep[] = [],
): EstimateDraft['accessSteps'] {
  const known = new Map(graph.map((s) => [s.code, s as StepSource]))
  for (const s of added) known.set(s.code, s)
  const result = [...current]
  const have = new Set(result.map((s) => s.code))
  const queue = added.map((s) => s.code)
  while (queue.length > 0) {
    const code = queue.shift() as string
    if (have.has(code)) continue
    const step = known.get(code)
    if (!step) continue
    have.add(code)
    result.push({ code: step.code, hours: step.hours, includes: [...step.includes], label: step.name })
    queue.push(...step.includes)
  }
  return result
}

/** A copy with the entry at `index` moved by `delta` places; unchanged when it would leave the list. */
export function moved<T>(list: readonly T[], index: number, delta: number): T[] {
  const target = index + delta
  if (index < 0 || index >= list.length || target < 0 || target >= list.length) return [...list]
  const copy = [...list]
  const [item] = copy.splice(index, 1)
  copy.splice(target, 0, item as T)
  return copy
}

export interface ItemRef {
  id: string
  number: number
  title: string
}

function joinAnd(parts: string[]): string {
  if (parts.length <= 1) return parts.join('')
  return `${parts.slice(0, -1).join(', ')} and ${parts.at(-1)}`
}

/** "Needs item 1 (Hub strip) to be approved", or null when the item stands alone. */
export function requiresWording(requires: readonly string[], items: readonly ItemRef[]): string | null {
  const named = requires.map((id) => {
    const found = items.find((i) => i.id === id)
    return found ? `item ${found.number} (${found.title})` : 'an item that is no longer on the estimate'
  })
  if (named.length === 0) return null
  return `Needs ${joinAnd(named)} to be approved`
}

export interface IssueLike {
  path: readonly PropertyKey[]
  message: string
}

export interface PlacedIssues {
  /** Messages for the estimate as a whole (access steps, discount, deposit, expiry). */
  general: string[]
  /** By item index: messages for the item itself, and by line index for its lines. */
  items: Map<number, { item: string[]; lines: Map<number, string[]> }>
}

/** Sorts the engine's and the contract's issues (paths such as ['items', 0, 'lines', 1, 'hours']) to where the builder shows them. */
export function placeIssues(issues: readonly IssueLike[]): PlacedIssues {
  const placed: PlacedIssues = { general: [], items: new Map() }
  const seen = new Set<string>()
  for (const issue of issues) {
    const key = `${issue.path.map(String).join('.')}|${issue.message}`
    if (seen.has(key)) continue
    seen.add(key)
    const [head, itemIndex, sub, lineIndex] = issue.path
    if (head !== 'items' || typeof itemIndex !== 'number') {
      placed.general.push(issue.message)
      continue
    }
    let entry = placed.items.get(itemIndex)
    if (!entry) {
      entry = { item: [], lines: new Map() }
      placed.items.set(itemIndex, entry)
    }
    if (sub === 'lines' && typeof lineIndex === 'number') {
      const list = entry.lines.get(lineIndex) ?? []
      list.push(issue.message)
      entry.lines.set(lineIndex, list)
    } else {
      entry.item.push(issue.message)
    }
  }
  return placed
}
