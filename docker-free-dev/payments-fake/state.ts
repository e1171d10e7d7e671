import { randomBytes } from 'node:crypto'
import type Stripe from 'stripe'
import type { CardInput, TestCard } from './cards'

const ALPHABET = '0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz'

/** Ids shaped like Stripe's (prefix + random base62), unguessable because a session id is the payment page's only key. */
export function randomId(prefix: string, length = 24): string {
  const bytes = randomBytes(length)
  let out = ''
  for (const b of bytes) out += ALPHABET[b % ALPHABET.length]
  return `${prefix}${out}`
}

export interface LineItemRecord {
  name: string
  description: string | null
  unitAmount: number
  quantity: number
}

/** A 3D Secure challenge shown to the customer and not yet answered. */
export interface PendingAuthentication {
  id: string
  paymentIntentId: string
  card: TestCard
  input: CardInput
  email: string | null
}

export interface SessionRecord {
  session: Stripe.Checkout.Session
  /** The session's total and currency, which Stripe's type leaves nullable (they are null in setup mode only). */
  total: { amount: number; currency: string }
  lineItems: LineItemRecord[]
  paymentIntentData: { description: string | null; metadata: Record<string, string>; receiptEmail: string | null }
  pendingAuthentication?: PendingAuthentication
}

export interface DeliveryAttempt {
  id: string
  event: string
  type: string
  url: string
  attempt: number
  /** The receiver's HTTP status, or null when it could not be reached in time. */
  status: number | null
  error: string | null
  succeeded: boolean
  redelivery: boolean
  at: string
}

export interface IdempotencyRecord {
  method: string
  path: string
  params: string
  status: number
  body: unknown
  requestId: string
  createdAtMs: number
}

export interface WebhookSettings {
  url: string | null
  secret: string | null
  maxAttempts: number
  backoffMs: number
  timeoutMs: number
  /** Like a Stripe webhook endpoint's enabled_events; null means every event the fake sends. */
  enabledEvents: string[] | null
}

export interface RequestInfo {
  id: string | null
  idempotencyKey: string | null
}

/** One secret key's world, like a separate Stripe account: nothing in it is visible to another key. */
export class Account {
  readonly sessions = new Map<string, SessionRecord>()
  readonly paymentIntents = new Map<string, Stripe.PaymentIntent>()
  readonly charges = new Map<string, Stripe.Charge>()
  readonly refunds = new Map<string, Stripe.Refund>()
  readonly events = new Map<string, Stripe.Event>()
  readonly deliveries: DeliveryAttempt[] = []
  readonly idempotency = new Map<string, IdempotencyRecord>()
  webhook: Partial<WebhookSettings> = {}
  /** Moves this account's clock (object timestamps, expiry) without touching webhook signing time. */
  clockOffsetSeconds = 0

  constructor(readonly secretKey: string) {}

  now(): number {
    return Math.floor(Date.now() / 1000) + this.clockOffsetSeconds
  }
}

export class AccountStore {
  private readonly accounts = new Map<string, Account>()
  private readonly sessionOwners = new Map<string, Account>()

  get(secretKey: string): Account {
    let account = this.accounts.get(secretKey)
    if (!account) {
      account = new Account(secretKey)
      this.accounts.set(secretKey, account)
    }
    return account
  }

  /** After a reset the old Account object is orphaned, which is how pending webhook retries know to stop. */
  isCurrent(account: Account): boolean {
    return this.accounts.get(account.secretKey) === account
  }

  reset(secretKey: string): void {
    const old = this.accounts.get(secretKey)
    if (!old) return
    for (const id of old.sessions.keys()) this.sessionOwners.delete(id)
    this.accounts.delete(secretKey)
  }

  addSession(account: Account, record: SessionRecord): void {
    account.sessions.set(record.session.id, record)
    this.sessionOwners.set(record.session.id, account)
  }

  /** The payment page has no API key, only the session id in its URL. */
  findSession(id: string): { account: Account; record: SessionRecord } | undefined {
    const account = this.sessionOwners.get(id)
    const record = account?.sessions.get(id)
    return account && record ? { account, record } : undefined
  }

  all(): Account[] {
    return [...this.accounts.values()]
  }
}
