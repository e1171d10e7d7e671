import { ConflictError } from './errors'

/**
 * The PostgreSQL refusals we answer as the caller's to fix, by SQLSTATE
 * (https://www.postgresql.org/docs/current/errcodes-appendix.html). This is the one place that
 * reads a driver error's code or constraint.
 */
const violations = { '23505': 'unique', '23503': 'foreign_key', '23514': 'check' } as const

export type ViolationKind = (typeof violations)[keyof typeof violations]

interface DriverError {
  code?: unknown
  constraint?: unknown
  cause?: unknown
}

const isViolationCode = (code: unknown): code is keyof typeof violations => typeof code === 'string' && code in violations

/** The refused constraint, or null when `err` is not one; drizzle puts the driver error on `cause`. */
export function violationOf(err: unknown): { kind: ViolationKind; constraint: string | null } | null {
  for (const e of [err, (err as DriverError | null)?.cause] as (DriverError | null | undefined)[]) {
    if (e && isViolationCode(e.code))
      return { kind: violations[e.code], constraint: typeof e.constraint === 'string' ? e.constraint : null }
  }
  return null
}

export const isForeignKeyViolation = (err: unknown): boolean => violationOf(err)?.kind === 'foreign_key'
export const isUniqueViolation = (err: unknown): boolean => violationOf(err)?.kind === 'unique'

async function refusing<T>(run: () => Promise<T>, kind: ViolationKind, refusal: () => Error): Promise<T> {
  try {
    return await run()
  } catch (err) {
    if (violationOf(err)?.kind === kind) throw refusal()
    throw err
  }
}

/** Deleting something other records point at is refused with a message that says what to do instead. */
export function deleteOrRefuse<T>(run: () => Promise<T>, message: string): Promise<T> {
  return refusing(run, 'foreign_key', () => new ConflictError(message, 'in_use'))
}

/** A code or part number that is already taken is the caller's to fix, so it answers 409, not 500. */
export function saveOrRefuseTaken<T>(run: () => Promise<T>, message: string): Promise<T> {
  return refusing(run, 'unique', () => new ConflictError(message, 'code_taken'))
}

/** Escapes LIKE wildcards so a search for "50%" finds the text "50%". */
export function likePattern(q: string): string {
  return `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`
}
