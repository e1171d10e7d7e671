import express, { type NextFunction, type Request, type Response } from 'express'
import Stripe from 'stripe'
import {
  createCheckoutSession,
  expandPaymentIntent,
  expandSession,
  expireDueSessions,
  expireSessionByApi,
  type FakeDeps,
  getSession,
} from './checkout'
import {
  authenticationError,
  FakeStripeError,
  idempotencyError,
  invalidRequest,
  parameterInvalid,
  resourceMissing,
  unrecognizedUrl,
} from './errors'
import { canonicalParams, ParamReader } from './params'
import { createRefund, expandRefund } from './refunds'
import { type Account, randomId, type RequestInfo } from './state'

const IDEMPOTENCY_TTL_MS = 24 * 60 * 60 * 1000

const NO_KEY_MESSAGE =
  "You did not provide an API key. You need to provide your API key in the Authorization header, using Bearer auth (e.g. 'Authorization: Bearer YOUR_SECRET_KEY'). See https://stripe.com/docs/api#authentication for details, or we can help at https://support.stripe.com/."

function mask(key: string): string {
  const prefix = /^[a-z]{2}_(test|live)_/.exec(key)?.[0] ?? ''
  const rest = key.slice(prefix.length)
  return `${prefix}${'*'.repeat(Math.max(0, rest.length - 4))}${rest.slice(-4)}`
}

/**
 * The secret key from `Authorization: Bearer sk_test_…` (or HTTP Basic with the key as user
 * name, as curl -u sends it), per "Authentication" (https://docs.stripe.com/api/authentication).
 * Each test key is its own account; live keys are refused so a real key never reaches the fake.
 */
export function secretKeyOf(req: Request): string {
  const header = req.get('authorization')
  if (!header) throw authenticationError(NO_KEY_MESSAGE)
  let key: string | undefined
  const bearer = /^Bearer\s+(\S+)\s*$/i.exec(header)
  const basic = /^Basic\s+(\S+)\s*$/i.exec(header)
  if (bearer) key = bearer[1]
  else if (basic)
    key = Buffer.from(basic[1] ?? '', 'base64')
      .toString('utf8')
      .split(':')[0]
  if (!key) throw authenticationError(NO_KEY_MESSAGE)
  if (key.startsWith('sk_live_') || key.startsWith('rk_live_')) {
    throw authenticationError(
      'The payments fake refuses live-mode keys: use a test key (sk_test_…) here, and never send a live key to a fake.',
    )
  }
  if (!/^sk_test_\w+$/.test(key)) throw authenticationError(`Invalid API Key provided: ${mask(key)}`)
  return key
}

interface ApiContext {
  account: Account
  params: ParamReader
  request: RequestInfo
  pageBaseUrl: string
  pathParam(name: string): string
}

type Handler = (ctx: ApiContext) => unknown

interface RouterOptions {
  deps: FakeDeps
  pageBaseUrl(req: Request): string
  log(line: string): void
}

function send(res: Response, status: number, body: unknown): void {
  res
    .status(status)
    .type('application/json')
    .send(JSON.stringify(body, null, 2))
}

/** Stripe's v1 API for the subset the product uses; every answer is a `stripe`-typed object or Stripe's error shape. */
export function createApiRouter({ deps, pageBaseUrl, log }: RouterOptions): express.Router {
  const router = express.Router()
  router.use(express.urlencoded({ extended: true, limit: '1mb' }))

  const handle = (method: 'get' | 'post', path: string, handler: Handler) => {
    router[method](path, (req: Request, res: Response) => {
      const requestId = randomId('req_', 14)
      res.set('Request-Id', requestId)
      res.set('Stripe-Version', req.get('stripe-version') ?? Stripe.API_VERSION)
      res.set('Cache-Control', 'no-cache, no-store')
      let account: Account | undefined
      let idempotencyKey: string | null = null
      let canonical = ''
      try {
        account = deps.store.get(secretKeyOf(req))
        if (req.get('stripe-account') || req.get('stripe-context')) {
          throw invalidRequest('The payments fake does not support Connect: leave out the Stripe-Account and Stripe-Context headers.')
        }
        expireDueSessions(deps, account)
        const raw: unknown = method === 'get' ? req.query : req.body
        canonical = canonicalParams(raw)
        if (method === 'post') idempotencyKey = req.get('idempotency-key') ?? null
        if (idempotencyKey !== null) {
          if (idempotencyKey.length > 255) throw parameterInvalid('Idempotency-Key', 'Idempotency keys can be at most 255 characters long.')
          const saved = account.idempotency.get(idempotencyKey)
          if (saved && Date.now() - saved.createdAtMs > IDEMPOTENCY_TTL_MS) account.idempotency.delete(idempotencyKey)
          else if (saved) {
            if (saved.method !== req.method || saved.path !== pathOf(req)) {
              throw idempotencyError(
                `Keys for idempotent requests can only be used for the same endpoint they were first used for ('${saved.method} ${saved.path}' vs '${req.method} ${pathOf(req)}'). Try using a key other than '${idempotencyKey}' if you meant to execute a different request.`,
              )
            }
            if (saved.params !== canonical) {
              throw idempotencyError(
                `Keys for idempotent requests can only be used with the same parameters they were first used with. Try using a key other than '${idempotencyKey}' if you meant to execute a different request.`,
              )
            }
            res.set('Idempotent-Replayed', 'true')
            res.set('Original-Request', saved.requestId)
            send(res, saved.status, saved.body)
            return
          }
        }
        const body = handler({
          account,
          params: ParamReader.root(raw),
          request: { id: requestId, idempotencyKey },
          pageBaseUrl: pageBaseUrl(req),
          pathParam: (name) => String(req.params[name] ?? ''),
        })
        remember(account, idempotencyKey, req, canonical, 200, body, requestId)
        send(res, 200, body)
      } catch (err) {
        if (!(err instanceof FakeStripeError)) throw err
        if (account && err.stage === 'execution') remember(account, idempotencyKey, req, canonical, err.status, err.toBody(), requestId)
        send(res, err.status, err.toBody())
      }
    })
  }

  handle('post', '/checkout/sessions', ({ account, params, pageBaseUrl }) => {
    const { session, expand } = createCheckoutSession(deps, account, params, pageBaseUrl)
    return expandSession(account, session, expand)
  })
  handle('get', '/checkout/sessions/:id', ({ account, params, pathParam }) => {
    const expand = readExpandOnly(params)
    return expandSession(account, getSession(account, pathParam('id')).session, expand)
  })
  handle('post', '/checkout/sessions/:id/expire', ({ account, params, pathParam, request }) => {
    const expand = readExpandOnly(params)
    const session = expireSessionByApi(deps, account, pathParam('id'), request)
    return expandSession(account, session, expand)
  })
  handle('get', '/payment_intents/:id', ({ account, params, pathParam }) => {
    const expand = readExpandOnly(params)
    const intent = account.paymentIntents.get(pathParam('id'))
    if (!intent) throw resourceMissing('payment_intent', pathParam('id'), 'intent')
    return expandPaymentIntent(account, intent, expand)
  })
  handle('post', '/refunds', ({ account, params, request }) => {
    const { refund, expand } = createRefund(deps, account, params, request)
    return expandRefund(account, refund, expand)
  })
  handle('get', '/refunds/:id', ({ account, params, pathParam }) => {
    const expand = readExpandOnly(params)
    const refund = account.refunds.get(pathParam('id'))
    if (!refund) throw resourceMissing('refund', pathParam('id'), 'refund')
    return expandRefund(account, refund, expand)
  })
  handle('get', '/events/:id', ({ account, params, pathParam }) => {
    params.done()
    const event = account.events.get(pathParam('id'))
    if (!event) throw resourceMissing('event', pathParam('id'), 'id')
    return event
  })

  router.use((req: Request, res: Response) => {
    const err = unrecognizedUrl(req.method, pathOf(req))
    send(res, err.status, err.toBody())
  })
  router.use((err: unknown, _req: Request, res: Response, _next: NextFunction) => {
    const status = typeof err === 'object' && err !== null && 'status' in err && typeof err.status === 'number' ? err.status : 500
    if (status < 500) {
      send(res, 400, {
        error: {
          type: 'invalid_request_error',
          message: 'Invalid request body: send parameters form-encoded (application/x-www-form-urlencoded).',
        },
      })
      return
    }
    log(`payments fake failed on a request: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}`)
    send(res, 500, { error: { type: 'api_error', message: 'The payments fake failed on this request; its log says why.' } })
  })
  return router
}

const pathOf = (req: Request) => `${req.baseUrl}${req.path}`

function readExpandOnly(params: ParamReader): string[] {
  const expand = params.stringArray('expand') ?? []
  params.done()
  return expand
}

/** Stripe keeps the first answer for a key, for 24 hours, once the endpoint began executing. */
function remember(
  account: Account,
  key: string | null,
  req: Request,
  params: string,
  status: number,
  body: unknown,
  requestId: string,
): void {
  if (key === null) return
  account.idempotency.set(key, { method: req.method, path: pathOf(req), params, status, body, requestId, createdAtMs: Date.now() })
}
