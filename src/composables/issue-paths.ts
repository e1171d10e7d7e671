import { computed, reactive, ref, toValue, watch, type MaybeRefOrGetter } from 'vue'
import type { ZodType, output } from 'zod'
import { type IssueLike, plainMessage, type ServerProblem } from './field-errors'

/** plainMessage, plus lists: zod's own wording for them is written for developers too. */
export function plainIssueMessage(issue: IssueLike): string {
  if (issue.origin === 'array' && issue.code === 'too_big' && issue.message.startsWith('Too big'))
    return `Choose at most ${String(issue.maximum)}`
  if (issue.origin === 'array' && issue.code === 'too_small' && issue.message.startsWith('Too small'))
    return `Choose at least ${String(issue.minimum)}`
  return plainMessage(issue)
}

/**
 * Messages keyed by their whole path joined with dots (`definition.checks.3.prompt`), for forms whose
 * fields sit deep inside lists, such as a check template; a server 422 path loses its leading 'body'.
 */
export function messagesByPath(issues: readonly IssueLike[]): Record<string, string[]> {
  const byPath: Record<string, string[]> = {}
  for (const issue of issues) {
    const path = issue.path[0] === 'body' ? issue.path.slice(1) : issue.path
    const key = path.map(String).join('.')
    ;(byPath[key] ??= []).push(plainIssueMessage(issue))
  }
  return byPath
}

/** The part of a path-keyed map under one prefix, with the prefix taken off the keys. */
export function messagesUnder(byPath: Record<string, string[]>, prefix: string): Record<string, string[]> {
  const under: Record<string, string[]> = {}
  const start = `${prefix}.`
  for (const [key, messages] of Object.entries(byPath)) {
    if (key.startsWith(start)) under[key.slice(start.length)] = messages
  }
  return under
}

/**
 * useFieldErrors for nested forms: messages keyed by dot-path (`explanation.what`), from the shared
 * schema on submit and from the server's 422 until the field is edited.
 */
export function usePathErrors(problem: MaybeRefOrGetter<ServerProblem | null | undefined>) {
  const local = ref<Record<string, string[]> | null>(null)
  const edited = reactive(new Set<string>())

  // A new answer from the server is what the form shows next, over what the schema said before sending.
  watch(
    () => toValue(problem),
    () => {
      edited.clear()
      local.value = null
    },
  )

  const fromServer = computed<Record<string, string[]>>(() => {
    const current = toValue(problem)
    return current?.status === 422 ? messagesByPath(current.issues) : {}
  })

  /** Every message, by path: what the schema found on the last submit, else what the server said. */
  const all = computed<Record<string, string[]>>(() => {
    if (local.value) return local.value
    return Object.fromEntries(Object.entries(fromServer.value).filter(([path]) => !edited.has(path)))
  })

  function errorsFor(path: string): string[] {
    return all.value[path] ?? []
  }

  /** The server's message when none of its issues has a field here (a conflict, a failure). */
  const formMessage = computed<string | null>(() => {
    const current = toValue(problem)
    if (!current) return null
    return Object.keys(fromServer.value).length > 0 ? null : current.message
  })

  function validate<S extends ZodType>(schema: S, values: unknown): output<S> | null {
    const result = schema.safeParse(values)
    if (result.success) {
      local.value = null
      return result.data
    }
    local.value = messagesByPath(result.error.issues)
    return null
  }

  function edit(path: string): void {
    if (local.value && path in local.value) {
      const { [path]: _dropped, ...rest } = local.value
      local.value = rest
    }
    edited.add(path)
  }

  function reset(): void {
    local.value = null
    edited.clear()
  }

  return { all, errorsFor, formMessage, validate, edit, reset }
}
