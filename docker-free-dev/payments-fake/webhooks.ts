import type Stripe from 'stripe'
import { signWebhookPayload } from './signature'
import { type Account, type AccountStore, type DeliveryAttempt, randomId, type WebhookSettings } from './state'

export const DEFAULT_WEBHOOK_SETTINGS: Omit<WebhookSettings, 'url' | 'secret'> = {
  maxAttempts: 4,
  backoffMs: 5_000,
  timeoutMs: 10_000,
  enabledEvents: null,
}

/** The fake never posts anywhere but this machine. */
export function isLoopbackUrl(value: string): boolean {
  try {
    const url = new URL(value)
    if (url.protocol !== 'http:' && url.protocol !== 'https:') return false
    return url.hostname === 'localhost' || url.hostname === '[::1]' || /^127(\.\d{1,3}){3}$/.test(url.hostname)
  } catch {
    return false
  }
}

/**
 * Posts events to the account's endpoint the way Stripe's webhooks arrive ("Receive Stripe
 * events in your webhook endpoint", https://docs.stripe.com/webhooks): JSON body, a
 * `Stripe-Signature` header made fresh for each attempt, any 2xx counts as delivered, anything
 * else (including redirects and timeouts) is retried with exponential backoff. Stripe retries
 * for days; here the number of attempts and the first delay are settings.
 */
export class WebhookDispatcher {
  private readonly timers = new Set<NodeJS.Timeout>()
  private readonly inFlight = new Set<AbortController>()
  private closed = false

  constructor(
    private readonly store: AccountStore,
    private readonly defaults: WebhookSettings,
    private readonly log: (line: string) => void,
  ) {}

  settingsFor(account: Account): WebhookSettings {
    const own = account.webhook
    return {
      url: own.url !== undefined ? own.url : this.defaults.url,
      secret: own.secret !== undefined ? own.secret : this.defaults.secret,
      maxAttempts: own.maxAttempts ?? this.defaults.maxAttempts,
      backoffMs: own.backoffMs ?? this.defaults.backoffMs,
      timeoutMs: own.timeoutMs ?? this.defaults.timeoutMs,
      enabledEvents: own.enabledEvents !== undefined ? own.enabledEvents : this.defaults.enabledEvents,
    }
  }

  wants(account: Account, type: string): boolean {
    const s = this.settingsFor(account)
    return (
      s.url !== null && s.secret !== null && (s.enabledEvents === null || s.enabledEvents.includes('*') || s.enabledEvents.includes(type))
    )
  }

  deliver(account: Account, event: Stripe.Event, redelivery: boolean): void {
    void this.attempt(account, event, 1, redelivery)
  }

  private async attempt(account: Account, event: Stripe.Event, attempt: number, redelivery: boolean): Promise<void> {
    if (this.closed || !this.store.isCurrent(account)) return
    const settings = this.settingsFor(account)
    if (settings.url === null || settings.secret === null) return
    const body = JSON.stringify(event, null, 2)
    const controller = new AbortController()
    const timer = setTimeout(() => controller.abort(), settings.timeoutMs)
    this.inFlight.add(controller)
    let status: number | null = null
    let error: string | null = null
    try {
      const res = await fetch(settings.url, {
        method: 'POST',
        headers: {
          'Content-Type': 'application/json; charset=utf-8',
          'User-Agent': 'Stripe/1.0 (+https://stripe.com/docs/webhooks)',
          'Stripe-Signature': signWebhookPayload(body, settings.secret),
        },
        body,
        redirect: 'manual',
        signal: controller.signal,
      })
      status = res.status
      await res.arrayBuffer()
    } catch (err) {
      error = controller.signal.aborted ? `no answer within ${settings.timeoutMs} ms` : err instanceof Error ? err.message : String(err)
    } finally {
      clearTimeout(timer)
      this.inFlight.delete(controller)
    }
    if (this.closed || !this.store.isCurrent(account)) return

    const succeeded = status !== null && status >= 200 && status < 300
    const record: DeliveryAttempt = {
      id: randomId('whdel_'),
      event: event.id,
      type: event.type,
      url: settings.url,
      attempt,
      status,
      error,
      succeeded,
      redelivery,
      at: new Date().toISOString(),
    }
    account.deliveries.push(record)
    if (succeeded) {
      event.pending_webhooks = 0
      return
    }
    if (attempt >= settings.maxAttempts) {
      this.log(`webhook ${event.type} ${event.id} to ${settings.url} gave up after ${attempt} attempts (last: ${status ?? error})`)
      return
    }
    const delay = settings.backoffMs * 2 ** (attempt - 1)
    const retry = setTimeout(() => {
      this.timers.delete(retry)
      void this.attempt(account, event, attempt + 1, redelivery)
    }, delay)
    this.timers.add(retry)
  }

  close(): void {
    this.closed = true
    for (const t of this.timers) clearTimeout(t)
    this.timers.clear()
    for (const c of this.inFlight) c.abort()
  }
}
