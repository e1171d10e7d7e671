import { randomUUID } from 'node:crypto'
import type { IncomingMessage, ServerResponse } from 'node:http'

const safeId = /^[A-Za-z0-9._-]{8,100}$/

/** Keeps a caller's request id when it looks safe, so logs across services line up; otherwise makes one. */
export function requestId(req: IncomingMessage, res: ServerResponse): string {
  const incoming = req.headers['x-request-id']
  const id = typeof incoming === 'string' && safeId.test(incoming) ? incoming : randomUUID()
  res.setHeader('X-Request-Id', id)
  return id
}
