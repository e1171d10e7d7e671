import { randomBytes } from 'node:crypto'
import http from 'node:http'
import type twilio from 'twilio'
import type { MessageView } from '../../docker-free-dev/sms-fake/inspect'
import { createSmsClient } from '../../server/lib/sms'

/** The SMS fake that tests/setup/global.ts started for this run. */
export function smsFakeUrl(): string {
  const url = process.env.SMS_FAKE_URL
  if (!url) throw new Error('SMS_FAKE_URL is not set: run these tests through vitest, whose global setup starts the SMS fake.')
  return url
}

export interface Credentials {
  accountSid: string
  authToken: string
}

/** A new SID is a new, empty account in the fake, so tests never see each other's messages. */
export function freshAccount(): Credentials {
  return { accountSid: `AC${randomBytes(16).toString('hex')}`, authToken: randomBytes(16).toString('hex') }
}

export function smsFor(credentials: Credentials, apiBase = smsFakeUrl()): twilio.Twilio {
  return createSmsClient({ ...credentials, apiBase })
}

/** Twilio's test sender that passes every check (Twilio docs, "Test Credentials"). */
export const VALID_FROM = '+15005550006'
/** Ofcom's range for drama, "07700 900000 to 900999", in E.164. */
export const DRAMA_MOBILE = '+447700900123'

export async function inspected(query: Record<string, string>, base = smsFakeUrl()): Promise<MessageView[]> {
  const res = await fetch(`${base}/api/messages?${new URLSearchParams(query)}`)
  if (res.status !== 200) throw new Error(`GET /api/messages answered ${res.status}`)
  return ((await res.json()) as { messages: MessageView[] }).messages
}

export interface ReceivedCallback {
  /** The URL exactly as requested, path and query included, on the receiver's origin. */
  url: string
  params: Record<string, string>
  signature: string
  headers: http.IncomingHttpHeaders
  /** Arrival, in milliseconds since the epoch. */
  at: number
}

export interface CallbackReceiver {
  /** Where to point StatusCallback; a query string is kept, since it is part of what Twilio signs. */
  url: string
  received: ReceivedCallback[]
  close(): Promise<void>
}

/** A status callback endpoint on 127.0.0.1 that answers with the given statuses in turn, then 200. */
export async function startCallbackReceiver(statuses: number[] = []): Promise<CallbackReceiver> {
  const received: ReceivedCallback[] = []
  const queue = [...statuses]
  const server = http.createServer((req, res) => {
    const chunks: Buffer[] = []
    req.on('data', (c: Buffer) => chunks.push(c))
    req.on('end', () => {
      const address = server.address()
      const port = typeof address === 'object' && address !== null ? address.port : 0
      received.push({
        url: `http://127.0.0.1:${port}${req.url ?? ''}`,
        params: Object.fromEntries(new URLSearchParams(Buffer.concat(chunks).toString('utf8'))),
        signature: String(req.headers['x-twilio-signature'] ?? ''),
        headers: req.headers,
        at: Date.now(),
      })
      res.statusCode = queue.shift() ?? 200
      res.end()
    })
  })
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve))
  const address = server.address()
  if (typeof address !== 'object' || address === null) throw new Error('receiver did not bind')
  return {
    url: `http://127.0.0.1:${address.port}/api/sms/status?estimate=e1&channel=sms`,
    received,
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve())
        server.closeAllConnections()
      }),
  }
}
