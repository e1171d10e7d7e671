import express, { type Request, type Response } from 'express'
import { renderMessagesPage } from './page'
import type { AccountStore, MessageRecord } from './state'

/** A received message as the inspection API shows it: the Message resource plus what happened to it since. */
export function messageView(record: MessageRecord) {
  return {
    ...record.message,
    status_callback: record.statusCallback,
    status_history: record.history,
    status_callback_attempts: record.callbacks.map((c) => ({
      status: c.status,
      attempt: c.attempt,
      http_status: c.httpStatus,
      error: c.error,
      succeeded: c.succeeded,
      at: c.at,
    })),
  }
}

export type MessageView = ReturnType<typeof messageView>

const queryText = (req: Request, name: string) =>
  typeof req.query[name] === 'string' && req.query[name] !== '' ? req.query[name] : undefined

/**
 * What a developer or a test looks at, like the mail catcher's page and API (maildev's
 * GET /email, GET /email/:id, DELETE /email/all): not Twilio's, with no credentials, on loopback only.
 * Lists are newest first; `?account_sid=` narrows to one account and `?to=` to one recipient, so test
 * files sharing one fake see only their own messages.
 */
export function createInspectionRouter(store: AccountStore): express.Router {
  const router = express.Router()
  const selected = (req: Request) => {
    const to = queryText(req, 'to')
    return store.list(queryText(req, 'account_sid')).filter((r) => to === undefined || r.message.to === to)
  }

  router.get('/', (req: Request, res: Response) => {
    res
      .set('Cache-Control', 'no-store')
      .type('html')
      .send(renderMessagesPage(selected(req)))
  })
  router.get('/api/messages', (req: Request, res: Response) => {
    res.set('Cache-Control', 'no-store').json({ messages: selected(req).map(messageView) })
  })
  router.get('/api/messages/:sid', (req: Request, res: Response) => {
    const sid = String(req.params.sid)
    const record = store.find(sid)
    if (!record) {
      res.status(404).json({ error: `No message ${sid} here.` })
      return
    }
    res.set('Cache-Control', 'no-store').json(messageView(record))
  })
  router.delete('/api/messages', (req: Request, res: Response) => {
    res.json({ deleted: store.clear(queryText(req, 'account_sid')) })
  })
  return router
}
