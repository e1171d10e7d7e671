import { timingSafeEqual } from 'node:crypto'
import type { RequestHandler } from 'express'
import { ForbiddenError } from '../lib/errors'

const safeMethods = new Set(['GET', 'HEAD', 'OPTIONS'])

/**
 * Cross-site request forgery: a state-changing request must come from our own pages. Browsers say
 * where a request comes from (Sec-Fetch-Site, else Origin); a client that sends neither must carry
 * the session's CSRF token (GET /api/auth/csrf) in X-CSRF-Token.
 */
export function csrfProtection(allowedOrigins: string[]): RequestHandler {
  const allowed = new Set(allowedOrigins)
  return (req, _res, next) => {
    if (safeMethods.has(req.method)) return next()
    const site = req.get('sec-fetch-site')
    const origin = req.get('origin')
    if (site) {
      if (site === 'same-origin' || (site === 'same-site' && origin && allowed.has(origin))) return next()
      return next(new ForbiddenError('This request did not come from a Tickover page.', 'csrf_rejected'))
    }
    if (origin) {
      if (allowed.has(origin)) return next()
      return next(new ForbiddenError('This request did not come from a Tickover page.', 'csrf_rejected'))
    }
    const token = req.get('x-csrf-token')
    const expected = req.session?.csrfToken
    if (token && expected && token.length === expected.length && timingSafeEqual(Buffer.from(token), Buffer.from(expected))) return next()
    next(new ForbiddenError('This request is missing its CSRF token.', 'csrf_rejected'))
  }
}
