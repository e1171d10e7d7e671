import express, { type Request } from 'express'
import Stripe from 'stripe'
import { createApiRouter } from './api'
import { expireDueSessions, type FakeDeps } from './checkout'
import { newEvent } from './objects'
import { createPaymentPageRouter } from './payment-page'
import { AccountStore } from './state'
import { createTestRouter } from './test-routes'
import { DEFAULT_WEBHOOK_SETTINGS, isLoopbackUrl, WebhookDispatcher } from './webhooks'

export interface PaymentsFakeOptions {
  /** Default webhook endpoint for every key that has not set its own through POST /_fake/webhook. */
  webhookUrl?: string
  webhookSecret?: string
  webhookMaxAttempts?: number
  webhookBackoffMs?: number
  webhookTimeoutMs?: number
  /** Shown on the payment page, like the business name of a Stripe account. */
  merchantName?: string
  /** Base of the payment page URLs; by default the address the fake listens on. */
  publicUrl?: string
  /** How often sessions past expires_at are expired without anyone asking. */
  expirySweepMs?: number
  log?: (line: string) => void
}

export interface RunningPaymentsFake {
  url: string
  close(): Promise<void>
}

export interface PaymentsFake {
  app: express.Express
  listen(port?: number): Promise<RunningPaymentsFake>
}

export const DEFAULT_MERCHANT_NAME = 'Test workshop'

/**
 * A local stand-in for the part of Stripe the product uses (see docker-free-dev/README.md):
 * the v1 API under /v1, the hosted payment page under /c/pay, test-only routes under /_fake.
 * `app` can be driven in-process; `listen()` binds 127.0.0.1 only.
 */
export function createPaymentsFake(options: PaymentsFakeOptions = {}): PaymentsFake {
  if (options.webhookUrl !== undefined && !isLoopbackUrl(options.webhookUrl)) {
    throw new Error(`The webhook URL must be on this machine (127.0.0.1, localhost or [::1]): ${options.webhookUrl}`)
  }
  if (options.webhookUrl !== undefined && !options.webhookSecret) {
    throw new Error('A webhook URL needs a signing secret (PAYMENTS_FAKE_WEBHOOK_SECRET, e.g. whsec_local_dev).')
  }
  const log = options.log ?? (() => {})
  const store = new AccountStore()
  const webhooks = new WebhookDispatcher(
    store,
    {
      url: options.webhookUrl ?? null,
      secret: options.webhookSecret ?? null,
      maxAttempts: options.webhookMaxAttempts ?? DEFAULT_WEBHOOK_SETTINGS.maxAttempts,
      backoffMs: options.webhookBackoffMs ?? DEFAULT_WEBHOOK_SETTINGS.backoffMs,
      timeoutMs: options.webhookTimeoutMs ?? DEFAULT_WEBHOOK_SETTINGS.timeoutMs,
      enabledEvents: DEFAULT_WEBHOOK_SETTINGS.enabledEvents,
    },
    log,
  )

  const deps: FakeDeps = {
    store,
    merchantName: (record) => options.merchantName ?? record.session.metadata?.merchant_name ?? DEFAULT_MERCHANT_NAME,
    emit(account, payload, request) {
      const wanted = webhooks.wants(account, payload.type)
      const event = newEvent(payload, {
        created: account.now(),
        apiVersion: Stripe.API_VERSION,
        pendingWebhooks: wanted ? 1 : 0,
        request: { id: request.id, idempotency_key: request.idempotencyKey },
      })
      account.events.set(event.id, event)
      if (wanted) webhooks.deliver(account, event, false)
    },
  }

  let listeningUrl: string | undefined
  const pageBaseUrl = (req: Request) => options.publicUrl ?? listeningUrl ?? `${req.protocol}://${req.get('host') ?? '127.0.0.1'}`

  const app = express()
  app.disable('x-powered-by')
  app.set('query parser', 'extended')
  app.use('/v1', createApiRouter({ deps, pageBaseUrl, log }))
  app.use('/_fake', createTestRouter({ ...deps, webhooks }))
  app.use(createPaymentPageRouter(deps))
  app.get('/', (_req, res) => {
    res.type('text/plain').send('Payments fake: a local stand-in for the Stripe API subset described in docker-free-dev/README.md.\n')
  })

  return {
    app,
    listen(port = 0) {
      return new Promise((resolve, reject) => {
        const server = app.listen(port, '127.0.0.1')
        server.once('error', reject)
        server.once('listening', () => {
          const address = server.address()
          const bound = typeof address === 'object' && address !== null ? address.port : port
          listeningUrl = `http://127.0.0.1:${bound}`
          const sweep = setInterval(() => {
            for (const account of store.all()) expireDueSessions(deps, account)
          }, options.expirySweepMs ?? 10_000)
          sweep.unref()
          resolve({
            url: listeningUrl,
            close: () =>
              new Promise<void>((done) => {
                clearInterval(sweep)
                webhooks.close()
                server.close(() => done())
                server.closeAllConnections()
              }),
          })
        })
      })
    },
  }
}
