import { z } from 'zod'

/**
 * Characters no text field takes: C0 controls (NUL among them, which PostgreSQL refuses in text) and DEL,
 * except tab, and line breaks where the field is multi-line; C1 controls; lone UTF-16 surrogates.
 * Unicode's Cc category is exactly C0, DEL and C1.
 */
const controlCharacters = /(?![\t\n\r])\p{Cc}/u
const controlOrBreak = /(?!\t)\p{Cc}/u
const loneSurrogate = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/

/**
 * Text a person types, checked so that it can always be stored and shown: no control characters, at most
 * `max` characters. Every text field of every contract is built on this, so no input can reach the database
 * as something it refuses. Trimmed unless `trim: false`.
 */
export function safeText(opts: { max: number; min?: number; multiline?: boolean; trim?: boolean; label?: string }) {
  const what = opts.label ?? 'This'
  const base = opts.trim === false ? z.string() : z.string().trim()
  return base
    .max(opts.max, `${what} can be at most ${opts.max} characters`)
    .min(opts.min ?? 0, opts.min === 1 ? `${what} cannot be empty` : `${what} needs at least ${opts.min} characters`)
    .refine((v) => !(opts.multiline ? controlCharacters : controlOrBreak).test(v), {
      message: opts.multiline
        ? `${what} contains a control character; type or paste plain text`
        : `${what} contains a line break or control character; keep it on one line`,
    })
    .refine((v) => !loneSurrogate.test(v), { message: `${what} contains a broken character; type it again` })
}

/** PostgreSQL's integer (int4) range: every whole number stored in an integer column is checked against it. */
export const INT4_MAX = 2_147_483_647
export const INT4_MIN = -2_147_483_648

/** A whole number that fits an integer column, within `min`..`max` (defaults: the column's own range). */
export function int4(opts: { min?: number; max?: number } = {}) {
  return z
    .number()
    .int()
    .min(opts.min ?? INT4_MIN)
    .max(opts.max ?? INT4_MAX)
}

export const IdParamsSchema = z.object({ id: z.uuid({ error: 'Not a valid id' }) })

/** Server-side paged, sorted, searched lists share this query shape. */
export function listQuerySchema<const S extends readonly [string, ...string[]]>(sortable: S) {
  return z.object({
    page: z.coerce.number().int().min(1).default(1),
    pageSize: z.coerce.number().int().min(1).max(100).default(25),
    sortBy: z.enum(sortable).optional(),
    sortDesc: z
      .enum(['true', 'false'])
      .transform((v) => v === 'true')
      .optional(),
    q: z.string().trim().max(200).optional(),
  })
}

export interface Page<T> {
  items: T[]
  total: number
  page: number
  pageSize: number
}

export const optionalText = (max: number) =>
  z
    .string()
    .trim()
    .max(max)
    .transform((v) => (v === '' ? null : v))
    .nullable()
    .optional()
