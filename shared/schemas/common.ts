import { z } from 'zod'

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
