import { randomBytes } from 'node:crypto'
import type { MessageInstance, MessageStatus } from 'twilio/lib/rest/api/v2010/account/message'

export type { MessageStatus }

/** The JSON the SDK reads a Message from: the `payload` its MessageInstance is built with. */
type MessageResource = ConstructorParameters<typeof MessageInstance>[1]

/**
 * The SDK types that payload after deserialising (dates as Date, every field present); on the wire
 * dates are RFC 2822 text and unset fields are null (Twilio, "Message resource",
 * https://www.twilio.com/docs/messaging/api/message-resource). Mapping the SDK's own field list
 * keeps the fake's answer in step with it: a field added or dropped by an SDK upgrade fails the
 * type-check where messages are built.
 */
type OnTheWire<T> = T extends Date ? string | null : T extends string | number ? T | null : T

export type MessageJson = { [K in keyof MessageResource]: OnTheWire<MessageResource[K]> }

export const API_VERSION = '2010-04-01'

/** SIDs as Twilio writes them: a two-letter type prefix and 32 lower-case hex digits. */
export const newSid = (prefix: 'SM' | 'RQ') => `${prefix}${randomBytes(16).toString('hex')}`

export const ACCOUNT_SID = /^AC[0-9a-f]{32}$/
export const AUTH_TOKEN = /^[0-9a-f]{32}$/
export const MESSAGING_SERVICE_SID = /^MG[0-9a-f]{32}$/

/** Twilio's date format, e.g. "Thu, 24 Aug 2023 05:01:45 +0000", the one the SDK parses. */
export const rfc2822 = (ms: number) => new Date(ms).toUTCString().replace(/GMT$/, '+0000')

export interface StatusChange {
  status: MessageStatus
  at: string
}

export interface CallbackAttempt {
  /** The status this callback reported. */
  status: MessageStatus
  attempt: number
  /** The receiver's HTTP status, or null when it could not be reached in time. */
  httpStatus: number | null
  error: string | null
  succeeded: boolean
  at: string
}

export interface MessageRecord {
  sid: string
  accountSid: string
  /** Received, in milliseconds since the epoch. */
  receivedAt: number
  message: MessageJson
  statusCallback: string | null
  history: StatusChange[]
  callbacks: CallbackAttempt[]
  /** Set when the message is cleared away: its pending status changes and callbacks stop. */
  removed: boolean
}

/** One account SID's messages, invisible to every other SID; its auth token is the one its first request carried. */
export class Account {
  readonly messages = new Map<string, MessageRecord>()

  constructor(
    readonly sid: string,
    readonly authToken: string,
  ) {}
}

export class AccountStore {
  private readonly accounts = new Map<string, Account>()
  /** Every message in arrival order, for the page and the inspection API. */
  private readonly received: MessageRecord[] = []

  /** The account for these credentials, made on first use; undefined when the SID is known with another token. */
  signIn(sid: string, authToken: string): Account | undefined {
    const known = this.accounts.get(sid)
    if (known) return known.authToken === authToken ? known : undefined
    const account = new Account(sid, authToken)
    this.accounts.set(sid, account)
    return account
  }

  add(account: Account, record: MessageRecord): void {
    account.messages.set(record.sid, record)
    this.received.push(record)
  }

  /** Newest first, optionally one account's only. */
  list(accountSid?: string): MessageRecord[] {
    return this.received.filter((r) => accountSid === undefined || r.accountSid === accountSid).reverse()
  }

  find(sid: string): MessageRecord | undefined {
    return this.received.find((r) => r.sid === sid)
  }

  /** Forgets messages (all, or one account's); returns how many. Accounts and their tokens stay. */
  clear(accountSid?: string): number {
    let cleared = 0
    for (let i = this.received.length - 1; i >= 0; i--) {
      const record = this.received[i]
      if (!record || (accountSid !== undefined && record.accountSid !== accountSid)) continue
      record.removed = true
      this.accounts.get(record.accountSid)?.messages.delete(record.sid)
      this.received.splice(i, 1)
      cleared += 1
    }
    return cleared
  }
}
