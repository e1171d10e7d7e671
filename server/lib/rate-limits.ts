import type { Request, RequestHandler } from 'express'
import { ipKeyGenerator, rateLimit } from 'express-rate-limit'
import type pg from 'pg'
import { z } from 'zod'
import type { Env } from '../env'
import { PostgresRateLimitStore } from './rate-limit-store'
import { hashToken } from './tokens'

const FIFTEEN_MINUTES = 15 * 60_000

/** A limit keyed on a body field goes after the body's validation; the hash keeps addresses and tokens out of the store. */
function hashedBodyField(field: string): (req: Request) => string {
  const schema = z.object({ [field]: z.string() })
  return (req) => {
    const parsed = schema.safeParse(req.body)
    return hashToken(parsed.success ? (parsed.data[field] ?? '') : '')
  }
}

function limiter(pool: pg.Pool, prefix: string, limit: number, keyGenerator?: (req: Request) => string): RequestHandler {
  return rateLimit({
    windowMs: FIFTEEN_MINUTES,
    limit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    store: new PostgresRateLimitStore(pool, prefix),
    ...(keyGenerator ? { keyGenerator } : {}),
    handler: (_req, res) => {
      res.status(429).json({ error: { code: 'too_many_requests', message: 'Too many attempts. Please wait a few minutes and try again.' } })
    },
  })
}

/** Sign-in requests are limited per address and per client, in PostgreSQL so the limit holds across processes. */
export function createAuthLimits(env: Env, pool: pg.Pool) {
  if (!env.RATE_LIMITS) {
    const pass: RequestHandler = (_req, _res, next) => next()
    return { byIp: pass, byEmail: pass, verifyByIp: pass }
  }
  return {
    byIp: limiter(pool, 'link-ip:', 20, (req) => ipKeyGenerator(req.ip ?? 'unknown')),
    byEmail: limiter(pool, 'link-email:', 5, hashedBodyField('email')),
    verifyByIp: limiter(pool, 'verify-ip:', 30, (req) => ipKeyGenerator(req.ip ?? 'unknown')),
  }
}

/** Renewal asks send e-mail to a customer, so they are limited per client and per token, like the sign-in limits. */
export function createRenewLimits(env: Pick<Env, 'RATE_LIMITS'>, pool: pg.Pool): { byIp: RequestHandler; byToken: RequestHandler } {
  if (!env.RATE_LIMITS) {
    const pass: RequestHandler = (_req, _res, next) => next()
    return { byIp: pass, byToken: pass }
  }
  return {
    byIp: limiter(pool, 'renew-ip:', 10, (req) => ipKeyGenerator(req.ip ?? 'unknown')),
    byToken: limiter(pool, 'renew-token:', 3, hashedBodyField('token')),
  }
}
