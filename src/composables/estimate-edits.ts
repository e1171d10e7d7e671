import type { AccessStep, LabourOperation } from '@shared/schemas/catalogue'
import type { DraftItem, DraftLine, EstimateDraft } from '@shared/schemas/estimates'
import { labourLineFrom, mergeAccessSteps, moved } from './estimate-draft'

export interface RemovedItem {
  item: DraftItem
  index: number
  /** Items that required the removed one, so undoing puts that back too. */
  requiredBy: string[]
}

export type DraftSettings = Pick<EstimateDraft, 'taxMode' | 'taxRounding' | 'discount' | 'deposit' | 'expiresOn' | 'message'>

/** Applies one edit to the local draft (or refuses it while the draft is locked) and marks it for saving. */
export type ChangeDraft = (mutate: (d: EstimateDraft) => void) => void

export interface DraftEditHooks {
  /** A line left the draft: whatever its fields held that could not be saved goes with it. */
  lineGone: (lineId: string) => void
  /** The workshop's access steps, so a step an operation's steps include goes on the draft too. */
  accessSteps: () => AccessStep[]
}

/** The edits the builder makes to its local copy of a draft, each through `change`. */
export function useDraftEdits(change: ChangeDraft, { lineGone, accessSteps }: DraftEditHooks) {
  const itemIndex = (d: EstimateDraft, itemId: string) => d.items.findIndex((i) => i.id === itemId)

  function updateItem(itemId: string, patch: Partial<Omit<DraftItem, 'id' | 'lines'>>): void {
    change((d) => {
      const item = d.items[itemIndex(d, itemId)]
      if (item) Object.assign(item, patch)
    })
  }

  function moveItem(itemId: string, delta: number): void {
    change((d) => {
      d.items = moved(d.items, itemIndex(d, itemId), delta)
    })
  }

  function addItem(item: DraftItem): void {
    change((d) => {
      d.items.push(item)
    })
  }

  function removeItem(itemId: string): RemovedItem | null {
    let removed: RemovedItem | null = null
    change((d) => {
      const index = itemIndex(d, itemId)
      const item = d.items[index]
      if (!item) return
      const requiredBy = d.items.filter((i) => i.requires.includes(itemId)).map((i) => i.id)
      for (const other of d.items) other.requires = other.requires.filter((r) => r !== itemId)
      d.items.splice(index, 1)
      for (const line of item.lines) lineGone(line.id)
      removed = { item, index, requiredBy }
    })
    return removed
  }

  function restoreItem(removed: RemovedItem): void {
    change((d) => {
      if (d.items.some((i) => i.id === removed.item.id)) return
      d.items.splice(Math.min(removed.index, d.items.length), 0, removed.item)
      for (const other of d.items) {
        if (removed.requiredBy.includes(other.id) && !other.requires.includes(removed.item.id)) other.requires.push(removed.item.id)
      }
    })
  }

  function addLine(itemId: string, line: DraftLine): void {
    change((d) => {
      d.items[itemIndex(d, itemId)]?.lines.push(line)
    })
  }

  function updateLine(itemId: string, line: DraftLine): void {
    change((d) => {
      const item = d.items[itemIndex(d, itemId)]
      if (!item) return
      item.lines = item.lines.map((l) => (l.id === line.id ? line : l))
    })
  }

  function removeLine(itemId: string, lineId: string): void {
    lineGone(lineId)
    change((d) => {
      const item = d.items[itemIndex(d, itemId)]
      if (item) item.lines = item.lines.filter((l) => l.id !== lineId)
    })
  }

  /** A labour line from the labour-time table, with its access steps (and what they include) on the draft. */
  function addLabour(itemId: string, op: LabourOperation, taxRate: string): void {
    change((d) => {
      const item = d.items[itemIndex(d, itemId)]
      if (!item) return
      item.lines.push(labourLineFrom(op, taxRate))
      d.accessSteps = mergeAccessSteps(d.accessSteps, op.accessSteps, accessSteps())
    })
  }

  function updateSettings(patch: Partial<DraftSettings>): void {
    change((d) => {
      Object.assign(d, patch)
    })
  }

  return { updateItem, moveItem, addItem, removeItem, restoreItem, addLine, updateLine, removeLine, addLabour, updateSettings }
}
