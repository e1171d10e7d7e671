import { randomUUID } from 'node:crypto'
import { twilioSignature } from './signature'
import type { MessageRecord, MessageStatus } from './state'

export interface CallbackSettings {
  maxAttempts: number
  /** Delay before the first retry; it doubles for each one after. */
  backoffMs: number
  timeoutMs: number
}

export const DEFAULT_CALLBACK_SETTINGS: CallbackSettings = { maxAttempts: 4, backoffMs: 5_000, timeoutMs: 10_000 }

export interface StatusCallback {
  record: MessageRecord
  url: string
  authToken: string
  status: MessageStatus
  params: Record<string, string>
}

/**
 * Posts status callbacks the way Twilio's arrive (Twilio, "Track the message status of outbound
 * messages" and "Webhooks security"): form-encoded, signed with `X-Twilio-Signature`, any 2xx counts
 * as received. One message's callbacks go one at a time, a later status waiting until the earlier
 * one was received or given up on, so a receiver sees them in order. Twilio itself retries a
 * callback only when asked to through connection overrides on the URL (from memory of "Webhooks
 * connection overrides"); here a failed one is retried with exponential backoff, as the payments
 * fake does, so a receiver's failure handling can be exercised.
 */
export class StatusCallbackDispatcher {
  private readonly queues = new Map<string, Promise<void>>()
  private readonly timers = new Set<NodeJS.Timeout>()
  private readonly inFlight = new Set<AbortController>()
  private closed = false

  constructor(
    private readonly settings: CallbackSettings,
    private readonly log: (line: string) => void,
  ) {}

  send(callback: StatusCallback): void {
    const sid = callback.record.sid
    const next = (this.queues.get(sid) ?? Promise.resolve()).then(() => this.deliver(callback))
    this.queues.set(sid, next)
    void next.then(() => {
      if (this.queues.get(sid) === next) this.queues.delete(sid)
    })
  }

  private async deliver(callback: StatusCallback): Promise<void> {
    const { maxAttempts, backoffMs } = this.settings
    // One token for every attempt, so a receiver can tell a retry from a new callback.
    const idempotencyToken = randomUUID()
    for (let attempt = 1; attempt <= maxAttempts; attempt++) {
      if (this.closed || callback.record.removed) return
      const { httpStatus, error } = await this.post(callback, idempotencyToken)
      if (this.closed || callback.record.removed) return
      const succeeded = httpStatus !== null && httpStatus >= 200 && httpStatus < 300
      callback.record.callbacks.push({ status: callback.status, attempt, httpStatus, error, succeeded, at: new Date().toISOString() })
      if (succeeded) return
      if (attempt < maxAttempts) await this.sleep(backoffMs * 2 ** (attempt - 1))
    }
    this.log(`status callback ${callback.status} for ${callback.record.sid} to ${callback.url} gave up after ${maxAttempts} attempts`)
  }

  private async post(callback: StatusCallback, idempotencyToken: string): Promise<{ httpStatus: number | null; error: string | null }> {
    const controller = new AbortController()
    const timer = setTimeout(() => controller.abort(), this.settings.timeoutMs)
    this.inFlight.add(controller)
    try {
      const res = await fetch(callback.url, {
        method: 'POST',
        headers: {
          'Content-Type': 'application/x-www-form-urlencoded',
          'User-Agent': 'TwilioProxy/1.1',
          'I-Twilio-Idempotency-Token': idempotencyToken,
          'X-Twilio-Signature': twilioSignature(callback.authToken, callback.url, callback.params),
        },
        body: new URLSearchParams(callback.params),
        redirect: 'manual',
        signal: controller.signal,
      })
      await res.arrayBuffer()
      return { httpStatus: res.status, error: null }
    } catch (err) {
      const error = controller.signal.aborted
        ? `no answer within ${this.settings.timeoutMs} ms`
        : err instanceof Error
          ? err.message
          : String(err)
      return { httpStatus: null, error }
    } finally {
      clearTimeout(timer)
      this.inFlight.delete(controller)
    }
  }

  /** A sleep that close() cancels: its promise then never settles, and the queue behind it stops. */
  private sleep(ms: number): Promise<void> {
    return new Promise((resolve) => {
      const timer = setTimeout(() => {
        this.timers.delete(timer)
        resolve()
      }, ms)
      this.timers.add(timer)
    })
  }

  close(): void {
    this.closed = true
    for (const t of this.timers) clearTimeout(t)
    this.timers.clear()
    for (const c of this.inFlight) c.abort()
  }
}
