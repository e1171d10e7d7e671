import { randomBytes } from 'node:crypto'
import type { RequestHandler, Response } from 'express'
import type passportModule from 'passport'
import { Strategy as MagicLinkStrategy } from 'passport-magic-link'
import { SignInRequestSchema, SignInVerifySchema, type Principal } from '../../../shared/schemas/auth'
import type { Env } from '../../env'
import { auditContextOf } from '../../lib/audit'
import { BadRequestError } from '../../lib/errors'
import { anyone, signedIn } from '../../lib/access'
import type { RouteTable } from '../../lib/route-table'
import { handle } from '../../middleware/validate'
import { type Audience, type AuthService, SIGN_IN_LINK_SECONDS } from './auth.service'

type Passport = InstanceType<typeof passportModule.Passport>

interface LinkFields {
  email: string
  audience: Audience
  nonce: string
  purpose: 'sign-in' | 'invite'
}

/**
 * passport-magic-link signs and checks the link (HS256, 10-minute expiry); each link carries 256 random
 * bits from the CSPRNG as its nonce. Single use is enforced by our PostgreSQL table (hash only, one
 * atomic UPDATE) because the package's own storage interface compares raw tokens in a read-then-write.
 */
export function configureMagicLink(passport: Passport, service: AuthService, env: Env) {
  passport.use(
    new MagicLinkStrategy(
      {
        secret: `${env.AUTH_SECRET}:sign-in-links`,
        userFields: ['email', 'audience', 'nonce', 'purpose'],
        tokenField: 'token',
        ttl: SIGN_IN_LINK_SECONDS,
        passReqToCallbacks: true,
        verifyUserAfterToken: true,
      },
      async (req, user, token) => {
        const fields = user as unknown as LinkFields
        await service.issueLink(auditContextOf(req), fields.audience, fields.email, token, fields.purpose)
      },
      async (req, user) => {
        const fields = user as unknown as LinkFields
        // Passport hands over Express's untyped request; its body is the one /verify has validated.
        const { token } = SignInVerifySchema.parse(req.body)
        return (await service.acceptLink(auditContextOf(req), token, fields.audience)) as unknown as Record<string, unknown> | null
      },
    ),
  )
}

/** What passport's link flow needs of a request: a body to put the link's fields in. */
type LinkRequest = { body: unknown }
type Done = (err?: unknown) => void

function requestToken(passport: Passport, req: LinkRequest, res: Response, done: Done, fields: Omit<LinkFields, 'nonce'>) {
  req.body = { ...fields, nonce: randomBytes(32).toString('base64url') } satisfies LinkFields
  passport.authenticate('magiclink', { action: 'requestToken', session: false }, (err: unknown) => done(err ?? invalidLink()))(
    req,
    res,
    done,
  )
}

/** After an owner adds someone, the same sign-in link goes out, worded as an invitation; `done` runs once it has. */
export function inviteSender(passport: Passport) {
  return (req: LinkRequest, res: Response, email: string, done: Done) =>
    requestToken(passport, req, res, done, { email, audience: 'staff', purpose: 'invite' })
}

export type InviteSender = ReturnType<typeof inviteSender>

const sameAnswer = { message: 'If that address belongs to an account, a sign-in link is on its way. It works for 10 minutes.' }
const invalidLink = () =>
  new BadRequestError(
    'This sign-in link has expired or has already been used. Ask for a new one and use the newest e-mail.',
    'link_invalid',
  )

export function authRoutes(
  table: RouteTable,
  deps: {
    passport: Passport
    service: AuthService
    limits: { byIp: RequestHandler; byEmail: RequestHandler; verifyByIp: RequestHandler }
  },
) {
  const { passport, service, limits } = deps
  const g = table.group('/auth')

  const requestLink = (audience: Audience): RequestHandler[] => [
    limits.byIp,
    ...handle({ body: SignInRequestSchema }, limits.byEmail, (req, res, next) => {
      const answer = (err?: unknown) => (err ? next(err) : res.status(202).json(sameAnswer))
      requestToken(passport, req, res, answer, { email: req.body.email, audience, purpose: 'sign-in' })
    }),
  ]

  g.post('/staff/link', anyone, ...requestLink('staff'))
  g.post('/customer/link', anyone, ...requestLink('customer'))

  g.post(
    '/verify',
    anyone,
    limits.verifyByIp,
    handle({ body: SignInVerifySchema }, (req, res, next) => {
      passport.authenticate(
        'magiclink',
        { action: 'acceptToken', allowReuse: true, session: false },
        (err: unknown, user: Principal | false, _info: unknown, status?: number) => {
          if (err) return next(err)
          if (!user) {
            // 401 comes from the signature or expiry check, before our table saw the token.
            if (status === 401) return service.recordTamperedLink(auditContextOf(req)).then(() => next(invalidLink()), next)
            return next(invalidLink())
          }
          req.logIn(user, (loginErr) => {
            if (loginErr) return next(loginErr)
            req.session.signedInAt = Date.now()
            service.recordSignIn(auditContextOf(req), user).then(() => res.json({ user }), next)
          })
        },
      )(req, res, next)
    }),
  )

  g.get('/me', anyone, (req, res) => {
    res.json({ user: req.user ?? null })
  })

  g.get('/csrf', anyone, (req, res) => {
    req.session.csrfToken ??= randomBytes(32).toString('base64url')
    res.json({ token: req.session.csrfToken })
  })

  g.post('/sign-out', signedIn, async (req, res, next) => {
    await service.recordSignOut(auditContextOf(req))
    req.logout((err) => {
      if (err) return next(err)
      req.session.destroy((destroyErr) => {
        if (destroyErr) return next(destroyErr)
        res.clearCookie(String(req.app.get('session cookie name')), { path: '/' })
        res.status(204).end()
      })
    })
  })

  return g
}
