import express, { type Request, type Response } from 'express'
import { z } from 'zod'
import { secretKeyOf } from './api'
import { expireDueSessions, type FakeDeps } from './checkout'
import { FakeStripeError } from './errors'
import type { Account, AccountStore } from './state'
import { isLoopbackUrl, type WebhookDispatcher } from './webhooks'

/** Per-key webhook endpoint for tests; every field is optional and `null` url/secret switches delivery off. */
const WebhookConfigSchema = z.strictObject({
  url: z.string().refine(isLoopbackUrl, 'must be an http(s) URL on this machine (127.0.0.1, localhost or [::1])').nullable().optional(),
  secret: z.string().min(1).nullable().optional(),
  maxAttempts: z.number().int().min(1).max(20).optional(),
  backoffMs: z.number().int().min(0).max(3_600_000).optional(),
  timeoutMs: z.number().int().min(50).max(60_000).optional(),
  enabledEvents: z.array(z.string().min(1)).nullable().optional(),
})

const ClockSchema = z.strictObject({
  advanceSeconds: z
    .number()
    .int()
    .min(0)
    .max(10 * 365 * 24 * 3600),
})

/**
 * Routes that Stripe does not have, for tests and local runs only, all under /_fake and keyed
 * by the same secret key as the API: inspect an account's state, reset it, point its webhooks
 * somewhere, re-send an event (duplicate delivery), and move its clock forward.
 */
export function createTestRouter(deps: FakeDeps & { store: AccountStore; webhooks: WebhookDispatcher }): express.Router {
  const router = express.Router()
  router.use(express.json({ limit: '64kb' }))

  const withAccount = (handler: (account: Account, req: Request, res: Response) => void) => (req: Request, res: Response) => {
    try {
      const key = secretKeyOf(req)
      handler(deps.store.get(key), req, res)
    } catch (err) {
      if (!(err instanceof FakeStripeError)) throw err
      res.status(err.status).json(err.toBody())
    }
  }
  const invalid = (res: Response, message: string) => res.status(400).json({ error: { type: 'invalid_request_error', message } })

  router.get(
    '/state',
    withAccount((account, _req, res) => {
      expireDueSessions(deps, account)
      res.json({
        checkout_sessions: [...account.sessions.values()].map((r) => r.session),
        payment_intents: [...account.paymentIntents.values()],
        charges: [...account.charges.values()],
        refunds: [...account.refunds.values()],
        events: [...account.events.values()],
        webhook: deps.webhooks.settingsFor(account),
        webhook_deliveries: account.deliveries,
        clock_offset_seconds: account.clockOffsetSeconds,
      })
    }),
  )

  router.post(
    '/reset',
    withAccount((account, _req, res) => {
      deps.store.reset(account.secretKey)
      res.json({ reset: true })
    }),
  )

  router.post(
    '/webhook',
    withAccount((account, req, res) => {
      const parsed = WebhookConfigSchema.safeParse(req.body ?? {})
      if (!parsed.success) return invalid(res, z.prettifyError(parsed.error))
      const given = parsed.data
      const next = { ...account.webhook }
      if (given.url !== undefined) next.url = given.url
      if (given.secret !== undefined) next.secret = given.secret
      if (given.maxAttempts !== undefined) next.maxAttempts = given.maxAttempts
      if (given.backoffMs !== undefined) next.backoffMs = given.backoffMs
      if (given.timeoutMs !== undefined) next.timeoutMs = given.timeoutMs
      if (given.enabledEvents !== undefined) next.enabledEvents = given.enabledEvents
      account.webhook = next
      res.json(deps.webhooks.settingsFor(account))
    }),
  )

  router.post(
    '/events/:id/resend',
    withAccount((account, req, res) => {
      const event = account.events.get(String(req.params.id ?? ''))
      if (!event)
        return void res
          .status(404)
          .json({ error: { type: 'invalid_request_error', code: 'resource_missing', message: `No such event: '${req.params.id}'` } })
      const settings = deps.webhooks.settingsFor(account)
      if (settings.url === null || settings.secret === null)
        return invalid(res, 'No webhook endpoint is set for this key: POST /_fake/webhook first.')
      deps.webhooks.deliver(account, event, true)
      res.status(202).json({ resending: event.id, to: settings.url })
    }),
  )

  router.post(
    '/clock',
    withAccount((account, req, res) => {
      const parsed = ClockSchema.safeParse(req.body ?? {})
      if (!parsed.success) return invalid(res, z.prettifyError(parsed.error))
      account.clockOffsetSeconds += parsed.data.advanceSeconds
      expireDueSessions(deps, account)
      res.json({ now: account.now(), clock_offset_seconds: account.clockOffsetSeconds })
    }),
  )

  router.use((_req: Request, res: Response) => {
    res.status(404).json({
      error: { type: 'invalid_request_error', message: 'Unknown test route. See docker-free-dev/README.md for the /_fake routes.' },
    })
  })
  return router
}
