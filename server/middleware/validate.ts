import type { NextFunction, Request, RequestHandler, Response } from 'express'
import type { z } from 'zod'
import { ValidationError } from '../lib/errors'

export interface Schemas {
  body?: z.ZodType
  params?: z.ZodType
  query?: z.ZodType
}

type Parsed<S extends Schemas, K extends keyof Schemas, Otherwise> = S[K] extends z.ZodType ? z.output<S[K]> : Otherwise

/** A request whose body, params and query are what the schemas made of them. */
export type ParsedRequest<S extends Schemas> = Request<
  Parsed<S, 'params', Record<string, string>>,
  unknown,
  Parsed<S, 'body', unknown>,
  Parsed<S, 'query', Record<string, unknown>>
>

export type ParsedHandler<S extends Schemas> = (req: ParsedRequest<S>, res: Response, next: NextFunction) => unknown

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

/**
 * A route's handler with its input contract: validates, then runs `handlers` in order, the last of
 * which reads `req.body`, `req.params` and `req.query` typed as the schemas' output. Middleware that
 * must run after validation (a limiter keyed on a parsed field) goes before the handler.
 *
 *   g.put('/:id', write, handle({ params: IdParamsSchema, body: JobInputSchema }, async (req, res) => …))
 */
export function handle<S extends Schemas>(schemas: S, ...handlers: [...RequestHandler[], ParsedHandler<S>]): RequestHandler[] {
  // validate() has replaced body/params/query with the parsed values, so the handler's narrower request type holds.
  return [validate(schemas), ...(handlers as RequestHandler[])]
}
