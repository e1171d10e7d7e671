import connectPgSimple from 'connect-pg-simple'
import type { RequestHandler } from 'express'
import session from 'express-session'
import type pg from 'pg'
import type { Env } from '../env'

export function sessionCookieName(env: Env) {
  // The __Host- prefix pins the cookie to our exact origin, which browsers allow only for Secure cookies.
  return env.COOKIE_SECURE ? '__Host-tickover' : 'tickover.sid'
}

/**
 * Sessions live in PostgreSQL (connect-pg-simple) so every server process sees them. The cookie's
 * rolling maxAge is the idle timeout; the absolute lifetime is enforced by `absoluteLifetime`.
 */
export function createSessionMiddleware(env: Env, pool: pg.Pool): RequestHandler {
  const PgStore = connectPgSimple(session)
  return session({
    store: new PgStore({
      pool,
      tableName: 'sessions',
      createTableIfMissing: false,
      pruneSessionInterval: env.NODE_ENV === 'test' ? false : 15 * 60,
    }),
    name: sessionCookieName(env),
    secret: env.AUTH_SECRET,
    resave: false,
    saveUninitialized: false,
    rolling: true,
    cookie: {
      httpOnly: true,
      sameSite: 'lax',
      secure: env.COOKIE_SECURE,
      path: '/',
      maxAge: env.SESSION_IDLE_MINUTES * 60_000,
    },
  })
}

export function absoluteLifetime(env: Env, onExpired: (req: Parameters<RequestHandler>[0]) => Promise<void>): RequestHandler {
  const limitMs = env.SESSION_ABSOLUTE_HOURS * 3_600_000
  return (req, _res, next) => {
    const started = req.session?.signedInAt
    if (!req.user || !started || Date.now() - started <= limitMs) return next()
    onExpired(req)
      .then(
        () =>
          new Promise<void>((resolve, reject) =>
            req.logout((err) => (err ? reject(err) : req.session.destroy((e) => (e ? reject(e) : resolve())))),
          ),
      )
      .then(() => next(), next)
  }
}
