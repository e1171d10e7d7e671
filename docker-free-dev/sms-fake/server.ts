import express from 'express'
import { createApiRouter } from './api'
import { DEFAULT_CALLBACK_SETTINGS, StatusCallbackDispatcher } from './callbacks'
import { createInspectionRouter } from './inspect'
import { MessageLifecycle } from './lifecycle'
import { AccountStore } from './state'

export interface SmsFakeOptions {
  /** Time between a message's status changes (queued → sending → sent → delivered). */
  stepMs?: number
  callbackMaxAttempts?: number
  callbackBackoffMs?: number
  callbackTimeoutMs?: number
  log?: (line: string) => void
}

export interface RunningSmsFake {
  url: string
  close(): Promise<void>
}

export interface SmsFake {
  app: express.Express
  listen(port?: number): Promise<RunningSmsFake>
}

export const DEFAULT_STEP_MS = 1_000

/**
 * A local stand-in for the part of Twilio's Programmable Messaging the product uses (see
 * docker-free-dev/README.md): the Messages API under /2010-04-01, the page of received texts at /
 * and its JSON under /api/messages. `app` can be driven in-process; `listen()` binds 127.0.0.1 only.
 */
export function createSmsFake(options: SmsFakeOptions = {}): SmsFake {
  const log = options.log ?? (() => {})
  const store = new AccountStore()
  const callbacks = new StatusCallbackDispatcher(
    {
      maxAttempts: options.callbackMaxAttempts ?? DEFAULT_CALLBACK_SETTINGS.maxAttempts,
      backoffMs: options.callbackBackoffMs ?? DEFAULT_CALLBACK_SETTINGS.backoffMs,
      timeoutMs: options.callbackTimeoutMs ?? DEFAULT_CALLBACK_SETTINGS.timeoutMs,
    },
    log,
  )
  const lifecycle = new MessageLifecycle(options.stepMs ?? DEFAULT_STEP_MS, callbacks)

  const app = express()
  app.disable('x-powered-by')
  app.use('/2010-04-01', createApiRouter({ store, lifecycle, log }))
  app.use(createInspectionRouter(store))

  return {
    app,
    listen(port = 0) {
      return new Promise((resolve, reject) => {
        const server = app.listen(port, '127.0.0.1')
        server.once('error', reject)
        server.once('listening', () => {
          const address = server.address()
          const bound = typeof address === 'object' && address !== null ? address.port : port
          resolve({
            url: `http://127.0.0.1:${bound}`,
            close: () =>
              new Promise<void>((done) => {
                lifecycle.close()
                callbacks.close()
                server.close(() => done())
                server.closeAllConnections()
              }),
          })
        })
      })
    },
  }
}
