import { ConflictError, GoneError, NotFoundError, ValidationError } from '../../lib/errors'
import { itemWords } from './portal.emails'
import type { VersionRow } from './portal.repo'
import { safeCalculateEstimate } from '../../../shared/estimate'
import type { Decision, EstimateResult } from '../../../shared/estimate/contract'
import { snapshotToEngineInput, type EstimateSnapshot, type SnapshotItem } from '../../../shared/schemas/estimates'
import type { SupersededDetails } from '../../../shared/schemas/portal'

/**
 * The rules a customer's choices on a sent version follow, without I/O: which versions can still
 * be decided on, which combinations of choices the engine allows, and the words of each refusal.
 */

const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1)
export const listWords = (words: string[]) =>
  words.length <= 1 ? (words[0] ?? '') : `${words.slice(0, -1).join(', ')} and ${words.at(-1) ?? ''}`

/** Every item of the version with its stored choice, `pending` where none is stored. */
export function decisionsOf(snapshot: EstimateSnapshot, stored: Record<string, Decision>): Record<string, Decision> {
  return Object.fromEntries(snapshot.items.map((i) => [i.id, stored[i.id] ?? 'pending']))
}

export function itemOf(snapshot: EstimateSnapshot, itemId: string): SnapshotItem {
  const item = snapshot.items.find((i) => i.id === itemId)
  if (!item) throw new NotFoundError('No such item on this estimate.', 'no_such_item')
  return item
}

/** The engine's figures; stored choices that the rules no longer allow are shown as not yet decided rather than failing the page. */
export function figures(snapshot: EstimateSnapshot, decisions: Record<string, Decision>): EstimateResult {
  const decided = safeCalculateEstimate(snapshotToEngineInput(snapshot, decisions))
  if (decided.success) return decided.data
  const proposed = safeCalculateEstimate(snapshotToEngineInput(snapshot))
  if (!proposed.success) throw new Error(`sent version cannot be priced: ${proposed.issues[0]?.message ?? 'unknown'}`)
  return proposed.data
}

/** The engine's figures for these choices, or the engine's own issues as a refusal with `message`. */
export function priced(snapshot: EstimateSnapshot, decisions: Record<string, Decision>, message: string): EstimateResult {
  const decided = safeCalculateEstimate(snapshotToEngineInput(snapshot, decisions))
  if (!decided.success) {
    throw new ValidationError(
      message,
      decided.issues.map((i) => ({ path: i.path.map(String), message: i.message })),
      'cannot_price',
    )
  }
  return decided.data
}

export function superseded(latestVersion: number) {
  return new ConflictError(
    `The workshop has sent a newer version (version ${latestVersion}) of this estimate. Please look at that one.`,
    'superseded',
    { latestVersion } satisfies SupersededDetails,
  )
}

/** A version can be decided on while it is the latest, has not expired, and the estimate has not been withdrawn. */
export function refuseClosed(estimate: { withdrawnAt: Date | null }, version: VersionRow, latest: VersionRow) {
  if (estimate.withdrawnAt)
    throw new GoneError('The workshop has withdrawn this estimate, so it can no longer be decided on. Please contact them.', 'withdrawn')
  if (version.supersededAt || version.version !== latest.version) throw superseded(latest.version)
  if (version.expired)
    throw new GoneError(
      `This estimate could be decided on until the end of ${version.expiresOn}. Please contact the workshop for a new one.`,
      'expired',
    )
}

export function refuseConfirmed(version: VersionRow) {
  if (version.confirmedAt)
    throw new ConflictError(
      'You have already confirmed your decisions on this estimate. Please contact the workshop to change them.',
      'confirmed',
    )
}

/**
 * An approved item needs every item it `requires` approved too (the engine refuses anything
 * else). Rather than change another item behind the customer's back, a choice that would break
 * that is refused with words naming the other item, and the customer makes both choices.
 */
export function refuseBrokenRequirement(snapshot: EstimateSnapshot, item: SnapshotItem, next: Record<string, Decision>) {
  if (next[item.id] === 'approved') {
    const missing = item.requires.flatMap((id) => snapshot.items.filter((i) => i.id === id && next[i.id] !== 'approved'))
    if (missing.length > 0) {
      const names = listWords(missing.map(itemWords))
      throw new ValidationError(
        `${capitalise(itemWords(item))} can only be done together with ${names}. Approve ${missing.length === 1 ? 'that item' : 'those items'} first, or decline this one.`,
        missing.map((m) => ({ path: ['decisions', m.id], message: `${capitalise(itemWords(item))} needs ${itemWords(m)}` })),
        'requires',
      )
    }
    return
  }
  const dependants = snapshot.items.filter((i) => i.requires.includes(item.id) && next[i.id] === 'approved')
  if (dependants.length > 0) {
    const names = listWords(dependants.map(itemWords))
    throw new ValidationError(
      `You approved ${names}, which can only be done together with this item. Decline ${dependants.length === 1 ? 'that item' : 'those items'} first, or keep this one approved.`,
      dependants.map((d) => ({ path: ['decisions', d.id], message: `${capitalise(itemWords(d))} needs ${itemWords(item)}` })),
      'requires',
    )
  }
}

/** A confirmation needs every item approved or declined. */
export function refuseUndecided(snapshot: EstimateSnapshot, stored: Record<string, Decision>) {
  const open = snapshot.items.filter((i) => stored[i.id] !== 'approved' && stored[i.id] !== 'declined')
  if (open.length > 0) {
    throw new ValidationError(
      `Please approve or decline every item first: ${listWords(open.map(itemWords))} ${open.length === 1 ? 'is' : 'are'} not decided yet.`,
      open.map((i) => ({ path: ['decisions', i.id], message: `${capitalise(itemWords(i))} is not decided yet` })),
      'undecided',
    )
  }
}
