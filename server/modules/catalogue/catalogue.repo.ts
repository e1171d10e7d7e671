import { type InferSelectModel, type SQL, getTableColumns, sql } from 'drizzle-orm'
import { toSnakeCase } from 'drizzle-orm/casing'
import type { Database, Queryable } from '../../db/client'
import type { labourOperations, parts } from '../../db/schema'

/** Words as the advisor types them: lower case, letters and digits, at most eight. */
export function searchWords(q: string): string[] {
  return q
    .toLowerCase()
    .split(/[^\p{L}\p{N}]+/u)
    .filter(Boolean)
    .slice(0, 8)
}

/** The same key the database keeps for codes and part numbers (catalogue_lookup_key). */
export function lookupKey(q: string): string {
  return q.toUpperCase().replace(/[^A-Z0-9]/g, '')
}

/** Typos are only guessed at in words this long: a two- or three-letter word is too short to correct safely. */
const MIN_CORRECTED_LENGTH = 4

type Searchable = typeof labourOperations | typeof parts

/** A row as lists show it: without the search columns, which only the database reads. */
export type Listed<T extends Searchable> = Omit<InferSelectModel<T>, 'searchText' | 'searchVector' | 'lookupKey'>

const searchOnly = new Set(['searchText', 'searchVector', 'lookupKey'])
const listedColumns = (t: Searchable) => Object.entries(getTableColumns(t)).filter(([key]) => !searchOnly.has(key))

/** A raw result row back into Drizzle's shape: camelCase keys, each value through its column's own mapping. */
function fromRaw<T extends Searchable>(t: T, raw: Record<string, unknown>): Listed<T> {
  const row: Record<string, unknown> = {}
  for (const [key, column] of listedColumns(t)) {
    const value = raw[toSnakeCase(key)]
    row[key] = value === null || value === undefined ? null : column.mapFromDriverValue(value)
  }
  return row as Listed<T>
}

interface RankedSearch<T extends Searchable> {
  workshopId: string
  source: 'labour' | 'parts'
  table: T
  q: string
  /** Filters ANDed with the match. */
  where: SQL
  /** Orders results of equal score (then the id does). */
  sortName: SQL
  /** One more value per result row, computed for the page's rows only. */
  extra?: SQL
  limit: number
  offset: number
}

/**
 * The matching rows, best first, one page of them, with the number of matches.
 *
 * Every word must match (as a word, a stem, or the start of a word), except English stop words
 * such as "and". A word that starts no word in the workshop's catalogue is taken for a typo: the
 * three nearest known words by trigram similarity are accepted in its place ("swivle" → "swivel").
 * A query that is the start of a code or part number also matches, whatever its words.
 *
 * Ranking: the whole query equal to a code first, then the start of a code, then a record
 * matching every word as typed above one that needed a correction, then full-text rank, in which
 * shorter records win (normalisation 1 divides by the log of the length).
 *
 * One statement does it all, rows included: the lookup answers as the advisor types, and each
 * round trip to the database is a share of that time.
 */
export async function rankedSearch<T extends Searchable>(
  db: Database,
  s: RankedSearch<T>,
): Promise<{ rows: Listed<T>[]; extras: unknown[]; total: number }> {
  const words = searchWords(s.q)
  const key = lookupKey(s.q)
  if (words.length === 0 && key === '') return { rows: [], extras: [], total: 0 }
  const t = s.table
  const source = sql`${s.source}::catalogue_word_source`
  const columns = sql.join(
    listedColumns(t).map(([k]) => sql`${t}.${sql.identifier(toSnakeCase(k))}`),
    sql`, `,
  )
  // Words carry only letters and digits, so they are safe inside to_tsquery; they still travel as parameters.
  const result = await db.execute<Record<string, unknown> & { extra: unknown; total_matches: number }>(sql`
    with words as (
      select w.word, w.i, numnode(to_tsquery('english', w.word)) = 0 as stop
      from unnest(string_to_array(${words.join(' ')}, ' ')) with ordinality as w(word, i)
    ),
    kept as (
      select word, i from words where not stop or not exists (select 1 from words where not stop)
    ),
    alternatives as (
      select k.i,
        to_tsquery('simple', k.word || ':*') || to_tsquery('english', k.word) as typed,
        (select to_tsquery('simple', string_agg(near.word, ' | '))
           from (
             select cw.word from catalogue_words cw
             where cw.workshop_id = ${s.workshopId} and cw.source = ${source}
               and length(k.word) >= ${MIN_CORRECTED_LENGTH} and cw.word % k.word
               and not exists (
                 select 1 from catalogue_words known
                 where known.workshop_id = ${s.workshopId} and known.source = ${source} and starts_with(known.word, k.word))
             order by similarity(cw.word, k.word) desc, cw.word
             limit 3
           ) near) as corrected
      from kept k
    ),
    query as materialized (
      select
        (select string_agg('(' || a.typed::text || ')', ' & ') from alternatives a)::tsquery as typed,
        (select string_agg('(' || (a.typed || coalesce(a.corrected, a.typed))::text || ')', ' & ') from alternatives a)::tsquery as wide,
        (select bool_and(a.corrected is null) from alternatives a) as as_typed
    ),
    matched as materialized (
      select ${t.id} as id, ${s.sortName} as sort_name,
        (case when ${t.lookupKey} = ${key} then 4 when ${key} <> '' and ${t.lookupKey} like ${key} || '%' then 2 else 0 end)
        + ts_rank_cd(${t.searchVector}, query.wide, 1)
        + (case when not query.as_typed and ${t.searchVector} @@ query.typed then 1 else 0 end) as score
      from ${t}, query
      where ${t.workshopId} = ${s.workshopId}
        and (${t.searchVector} @@ query.wide or (${key} <> '' and ${t.lookupKey} like ${key} || '%'))
        and ${s.where}
    ),
    page as (
      select id, sort_name, score from matched order by score desc, sort_name, id limit ${s.limit} offset ${s.offset}
    )
    -- Only the page's rows are read in full; the ranking works on narrow tuples.
    select ${columns}, ${s.extra ?? sql`null`} as extra, (select count(*) from matched)::int as total_matches
    from page join ${t} on ${t.id} = page.id
    order by page.score desc, page.sort_name, page.id
  `)
  return { rows: result.rows.map((r) => fromRaw(t, r)), extras: result.rows.map((r) => r.extra), total: result.rows[0]?.total_matches ?? 0 }
}

/**
 * One import at a time per workshop: two owners committing files at once would otherwise each
 * check against a table the other is changing. Released when the transaction ends.
 */
export async function lockImports(tx: Queryable, workshopId: string): Promise<void> {
  await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${`tickover.catalogue-import:${workshopId}`}, 0))`)
}

/** An import's ON CONFLICT ... SET: each named column from the row the conflict turned away, and updatedAt now. */
export function fromExcluded<T extends { $inferInsert: object }>(_table: T, columns: (keyof T['$inferInsert'] & string)[]) {
  const set: Record<string, SQL> = { updatedAt: sql`now()` }
  for (const c of columns) set[c] = sql`excluded.${sql.identifier(toSnakeCase(c))}`
  return set
}

/** Rows in batches small enough for PostgreSQL's limit of 65,535 parameters a statement. */
export function* chunks<T>(items: T[], size: number): Generator<T[]> {
  for (let i = 0; i < items.length; i += size) yield items.slice(i, i + size)
}
