import { computed, ref } from 'vue'

/**
 * - `saved`: the server has every change
 * - `pending`: changed here, saving after a pause in typing
 * - `saving`: on its way
 * - `failed`: the last save did not go through; the next change or "Retry" tries again
 * - `invalid`: something must be fixed before it can be saved
 * - `stale`: someone else saved in between; only reloading gets out of it
 */
export type SaveState = 'saved' | 'pending' | 'saving' | 'failed' | 'invalid' | 'stale'

export interface AutosaveOptions<C, A> {
  /** The pause in typing after which a change is saved. */
  delayMs: number
  /** Problems other than the fields' own (the contract's, the engine's) that stop a save. */
  blocked: () => boolean
  /** A copy of what is to be saved, taken as the save starts; null when nothing is on the screen. */
  snapshot: () => C | null
  /** Sends the copy; the caller does the fetching. */
  write: (copy: C) => Promise<A>
  /** Takes the server's answer; false when what was saved left the screen meanwhile. */
  written: (answer: A) => boolean
  /** After a write failed, before the state says so: the caller may find it stale. */
  failed: (cause: unknown) => void
}

/**
 * Saving a local copy shortly after typing stops, one write at a time, and the state the screen
 * shows for it. A change made while a write is on its way is saved by the next one.
 */
export function useAutosave<C, A>({ delayMs, blocked, snapshot, write, written, failed }: AutosaveOptions<C, A>) {
  const dirty = ref(false)
  const saveState = ref<SaveState>('saved')
  /** What a field holds that cannot go on the copy yet ("12.5x"), by `${lineId}.${field}`. */
  const fieldProblems = ref<Record<string, string>>({})
  const hasProblems = computed(() => blocked() || Object.keys(fieldProblems.value).length > 0)

  let edits = 0
  let timer: ReturnType<typeof setTimeout> | undefined
  let inFlight: Promise<boolean> | null = null

  function schedule(): void {
    clearTimeout(timer)
    if (saveState.value === 'stale') return
    saveState.value = 'pending'
    timer = setTimeout(() => void save(), delayMs)
  }

  /** Saves now what is waiting; true when the server has every change. */
  async function save(): Promise<boolean> {
    clearTimeout(timer)
    if (inFlight) {
      await inFlight
      return save()
    }
    const copy = dirty.value ? snapshot() : null
    if (copy === null) return true
    if (saveState.value === 'stale') return false
    if (hasProblems.value) {
      saveState.value = 'invalid'
      return false
    }
    const sentEdits = edits
    saveState.value = 'saving'
    inFlight = (async () => {
      try {
        if (!written(await write(copy))) return false
        if (edits === sentEdits) {
          dirty.value = false
          saveState.value = 'saved'
        } else {
          schedule()
        }
        return true
      } catch (cause) {
        failed(cause)
        if (saveState.value !== 'stale') saveState.value = 'failed'
        return false
      } finally {
        inFlight = null
      }
    })()
    return inFlight
  }

  /** After the local copy changed. */
  function changed(): void {
    edits++
    dirty.value = true
    schedule()
  }

  /** Forgets every change and problem, e.g. when another record takes the screen. */
  function discard(): void {
    clearTimeout(timer)
    dirty.value = false
    saveState.value = 'saved'
    fieldProblems.value = {}
    edits = 0
  }

  /** Stops a save that is waiting for the pause in typing. */
  function cancel(): void {
    clearTimeout(timer)
  }

  const isWriting = () => inFlight !== null

  function setFieldProblem(key: string, message: string | null): void {
    const had = key in fieldProblems.value
    if (message) {
      fieldProblems.value = { ...fieldProblems.value, [key]: message }
      if (dirty.value && saveState.value === 'pending') saveState.value = 'invalid'
      return
    }
    if (!had) return
    const { [key]: _cleared, ...rest } = fieldProblems.value
    fieldProblems.value = rest
    if (dirty.value && saveState.value === 'invalid') schedule()
  }

  /** Clears the problems of every field under `prefix`, e.g. a line that was removed. */
  function clearProblemsOf(prefix: string): void {
    const rest = Object.fromEntries(Object.entries(fieldProblems.value).filter(([key]) => !key.startsWith(`${prefix}.`)))
    if (Object.keys(rest).length !== Object.keys(fieldProblems.value).length) fieldProblems.value = rest
  }

  return { dirty, saveState, fieldProblems, hasProblems, save, changed, discard, cancel, isWriting, setFieldProblem, clearProblemsOf }
}
