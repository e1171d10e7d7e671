import type { RequestHandler } from 'express'
import type { z } from 'zod'
import { ValidationError } from '../lib/errors'

interface Schemas {
  body?: z.ZodType
  params?: z.ZodType
  query?: z.ZodType
}

/** Parses body/params/query with the shared zod contracts; handlers read the parsed values and never re-parse. */
export function validate(schemas: Schemas): RequestHandler {
  return (req, _res, next) => {
    for (const part of ['params', 'query', 'body'] as const) {
      const schema = schemas[part]
      if (!schema) continue
      const parsed = schema.safeParse(req[part] ?? {})
      if (!parsed.success) {
        const issues = parsed.error.issues.map((i) => ({
          path: [part, ...i.path.map((p) => (typeof p === 'symbol' ? String(p) : p))],
          message: i.message,
          code: i.code,
        }))
        next(new ValidationError('Some of the details are not right. Please check the highlighted fields.', issues))
        return
      }
      // Express 5 makes req.query a getter, so the parsed copy is set as an own property.
      Object.defineProperty(req, part, { value: parsed.data, writable: true, configurable: true, enumerable: true })
    }
    next()
  }
}
