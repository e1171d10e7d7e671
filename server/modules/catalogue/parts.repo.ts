import { type SQL, and, asc, count, eq, isNotNull, isNull, sql } from 'drizzle-orm'
import type { Database, Queryable, Tx } from '../../db/client'
import { parts } from '../../db/schema'
import type { PartSearchQuery } from '../../../shared/schemas/catalogue'
import { type Listed, chunks, fromExcluded, lockImports, rankedSearch } from './catalogue.repo'

export type PartRow = typeof parts.$inferSelect
/** A part as lists and forms need it: without the search columns. */
export type PartRecord = Listed<typeof parts>
export type PartValues = Omit<typeof parts.$inferInsert, 'workshopId'>

export function createPartsRepo(db: Database) {
  return {
    db,
    transaction: <T>(fn: (tx: Tx) => Promise<T>) => db.transaction(fn),
    lockImports,

    async search(workshopId: string, q: PartSearchQuery): Promise<{ rows: PartRecord[]; total: number }> {
      const filters = q.archived ? isNotNull(parts.archivedAt) : isNull(parts.archivedAt)
      const offset = (q.page - 1) * q.pageSize
      if (q.q) {
        const { rows, total } = await rankedSearch(db, {
          workshopId,
          source: 'parts',
          table: parts,
          q: q.q,
          where: filters as SQL,
          sortName: sql`${parts.partNumber}`,
          limit: q.pageSize,
          offset,
        })
        return { rows, total }
      }
      const scoped = and(eq(parts.workshopId, workshopId), filters)
      const [rows, [total]] = await Promise.all([
        db.select().from(parts).where(scoped).orderBy(asc(parts.partNumber)).limit(q.pageSize).offset(offset),
        db.select({ n: count() }).from(parts).where(scoped),
      ])
      return { rows, total: total?.n ?? 0 }
    },

    async find(workshopId: string, id: string) {
      const [row] = await db
        .select()
        .from(parts)
        .where(and(eq(parts.workshopId, workshopId), eq(parts.id, id)))
      return row
    },

    async byPartNumber(tx: Queryable, workshopId: string): Promise<Map<string, PartRow>> {
      const rows = await tx.select().from(parts).where(eq(parts.workshopId, workshopId))
      return new Map(rows.map((r) => [r.partNumber, r]))
    },

    async insert(workshopId: string, values: PartValues) {
      const [row] = await db
        .insert(parts)
        .values({ workshopId, ...values })
        .returning()
      if (!row) throw new Error('part insert returned nothing')
      return row
    },

    async update(workshopId: string, id: string, values: Partial<PartValues>) {
      const [row] = await db
        .update(parts)
        .set(values)
        .where(and(eq(parts.workshopId, workshopId), eq(parts.id, id)))
        .returning()
      return row
    },

    /** Inserts new part numbers and overwrites existing ones, matched on the part number. */
    async upsert(tx: Queryable, workshopId: string, values: PartValues[]) {
      for (const chunk of chunks(values, 2000)) {
        await tx
          .insert(parts)
          .values(chunk.map((v) => ({ workshopId, ...v })))
          .onConflictDoUpdate({
            target: [parts.workshopId, parts.partNumber],
            set: fromExcluded(parts, ['description', 'supplierRef', 'costMinor', 'sellPriceMinor', 'taxRate', 'stockQuantity']),
          })
      }
    },
  }
}

export type PartsRepo = ReturnType<typeof createPartsRepo>
