import { computed, reactive, ref, toValue, watch, type MaybeRefOrGetter } from 'vue'
import type { ZodType, output } from 'zod'

/** A zod issue, or one of the server's 422 issues (ApiIssue), whose path starts with 'body'. */
export interface IssueLike {
  path: readonly PropertyKey[]
  message: string
  code?: string
  origin?: string
  minimum?: unknown
  maximum?: unknown
}

/** What a form needs to know of a failed request; an ApiError fits without the form importing the API layer. */
export interface ServerProblem {
  status: number
  code: string
  message: string
  issues: readonly IssueLike[]
}

/** zod's built-in wording is written for developers ("Too big: expected string to have <=20 characters"). */
export function plainMessage(issue: IssueLike): string {
  if (issue.code === 'too_big' && issue.origin === 'string' && issue.message.startsWith('Too big')) {
    return `Use at most ${String(issue.maximum)} characters`
  }
  if (issue.code === 'too_small' && issue.origin === 'string' && issue.message.startsWith('Too small')) {
    return 'Fill this in'
  }
  if (issue.code === 'invalid_type' && issue.message.startsWith('Invalid input')) return 'Fill this in'
  return issue.message
}

/** Messages keyed by the top-level field; our only list fields are lines of text, so an index names a line. */
export function messagesByField(issues: readonly IssueLike[]): Record<string, string[]> {
  const byField: Record<string, string[]> = {}
  for (const issue of issues) {
    const path = issue.path[0] === 'body' ? issue.path.slice(1) : issue.path
    const [field, index] = path
    if (typeof field !== 'string') continue
    const text = typeof index === 'number' ? `Line ${index + 1}: ${plainMessage(issue)}` : plainMessage(issue)
    ;(byField[field] ??= []).push(text)
  }
  return byField
}

export interface FieldErrorOptions {
  /** Conflicts that belong to one field, e.g. `{ email_taken: 'email' }`. */
  codeFields?: Record<string, string>
}

/**
 * Validation messages for a form: the shared zod schema's own on submit, and the server's 422 issues
 * (or a field-specific conflict) on the matching field until that field is edited.
 */
export function useFieldErrors(
  fields: readonly string[],
  problem: MaybeRefOrGetter<ServerProblem | null | undefined>,
  options: FieldErrorOptions = {},
) {
  const local = ref<Record<string, string[]>>({})
  const edited = reactive(new Set<string>())

  // A new answer from the server replaces what the person had corrected since the last one.
  watch(
    () => toValue(problem),
    () => edited.clear(),
  )

  const fromServer = computed<Record<string, string[]>>(() => {
    const current = toValue(problem)
    if (!current) return {}
    const field = options.codeFields?.[current.code]
    if (field) return { [field]: [current.message] }
    return current.status === 422 ? messagesByField(current.issues) : {}
  })

  function errorsFor(field: string): string[] {
    return local.value[field] ?? (edited.has(field) ? [] : (fromServer.value[field] ?? []))
  }

  /** The server's message when it cannot be shown on any field of this form (429, a conflict, a failure). */
  const formMessage = computed<string | null>(() => {
    const current = toValue(problem)
    if (!current) return null
    const placed = Object.keys(fromServer.value).some((f) => fields.includes(f))
    return placed ? null : current.message
  })

  /** Parses with the schema; on failure shows its messages and returns null. */
  function validate<S extends ZodType>(schema: S, values: unknown): output<S> | null {
    const result = schema.safeParse(values)
    if (result.success) {
      local.value = {}
      return result.data
    }
    local.value = messagesByField(result.error.issues)
    return null
  }

  /** Call when a field changes: its messages no longer describe what is there. */
  function edit(field: string): void {
    if (field in local.value) {
      const { [field]: _dropped, ...rest } = local.value
      local.value = rest
    }
    edited.add(field)
  }

  function reset(): void {
    local.value = {}
    edited.clear()
  }

  return { errorsFor, formMessage, validate, edit, reset }
}
