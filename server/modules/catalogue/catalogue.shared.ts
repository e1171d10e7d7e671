import { sql } from 'drizzle-orm'
import { ConflictError, ValidationError } from '../../lib/errors'
import type { ImportIssue } from '../../../shared/schemas/catalogue'
import type { Queryable } from './labour.repo'

/** PostgreSQL's SQLSTATE for a unique violation; drizzle puts the driver error on `cause`. */
const UNIQUE_VIOLATION = '23505'

/** A code or part number that is already taken is the caller's to fix, so it answers 409, not 500. */
export async function codeTaken<T>(run: () => Promise<T>, message: string): Promise<T> {
  try {
    return await run()
  } catch (err) {
    const e = err as { code?: string; cause?: { code?: string } }
    if (e?.code === UNIQUE_VIOLATION || e?.cause?.code === UNIQUE_VIOLATION) throw new ConflictError(message, 'code_taken')
    throw err
  }
}

/**
 * One import at a time per workshop: two owners committing files at once would otherwise each
 * check against a table the other is changing. Released when the transaction ends.
 */
export async function lockImports(tx: Queryable, workshopId: string): Promise<void> {
  await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${`tickover.catalogue-import:${workshopId}`}, 0))`)
}

/** The commit found problems: nothing is written, and each issue's path is [row, column]. */
export function refuseImport(errors: ImportIssue[]): never {
  throw new ValidationError(
    'The file has problems, so nothing was imported. Correct the rows listed and try again.',
    errors.map((e) => ({ path: [e.row, e.column ?? ''], message: e.message })),
    'import_has_errors',
  )
}
