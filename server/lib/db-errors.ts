import { ConflictError } from './errors'

/** PostgreSQL's SQLSTATE for a foreign key violation; drizzle puts the driver error on `cause`. */
const FOREIGN_KEY_VIOLATION = '23503'

export function isForeignKeyViolation(err: unknown): boolean {
  const e = err as { code?: string; cause?: { code?: string } }
  return e?.code === FOREIGN_KEY_VIOLATION || e?.cause?.code === FOREIGN_KEY_VIOLATION
}

/** Deleting something other records point at is refused with a message that says what to do instead. */
export async function deleteOrRefuse<T>(run: () => Promise<T>, message: string): Promise<T> {
  try {
    return await run()
  } catch (err) {
    if (isForeignKeyViolation(err)) throw new ConflictError(message, 'in_use')
    throw err
  }
}

/** Escapes LIKE wildcards so a search for "50%" finds the text "50%". */
export function likePattern(q: string): string {
  return `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`
}
