import { smsSegments } from '../../shared/sms'
import { isLoopbackUrl } from '../payments-fake/webhooks'
import { errors, FakeTwilioError } from './errors'
import { DELIVERY_FAILURES, type DeliveryFailure, fromRefusal, toRefusal } from './magic-numbers'
import {
  type Account,
  API_VERSION,
  type MessageJson,
  type MessageRecord,
  type MessageStatus,
  MESSAGING_SERVICE_SID,
  newSid,
  rfc2822,
} from './state'

/** The create parameters the fake implements (Twilio, "Message resource", Create a Message); any other is refused. */
const KNOWN_PARAMETERS = new Set(['To', 'From', 'MessagingServiceSid', 'Body', 'StatusCallback'])

/** Twilio's limit on one message's body (error 21617). */
const MAX_BODY_CHARACTERS = 1600

const E164 = /^\+[1-9]\d{1,14}$/
/** Alphanumeric sender IDs: up to 11 letters, digits and spaces, at least one letter (Twilio, "Alphanumeric Sender ID"; from memory). */
const ALPHANUMERIC_SENDER = /^(?=.*[A-Za-z])[A-Za-z0-9 ]{1,11}$/

export interface PlannedMessage {
  record: MessageRecord
  /** The statuses it moves through after the one it was created with. */
  plan: MessageStatus[]
  failure: DeliveryFailure | undefined
}

/** Reads one form parameter; Twilio's are single values, so a repeated one is refused rather than guessed at. */
function single(params: Record<string, unknown>, name: string): string | undefined {
  const value = params[name]
  if (value === undefined) return undefined
  if (typeof value !== 'string')
    throw new FakeTwilioError(400, 20001, `${name} was sent more than once; the SMS fake takes each parameter once.`)
  return value === '' ? undefined : value
}

/**
 * Validates a create-message request in the order Twilio's errors suggest (required fields, then
 * the sender, then the recipient) and builds the Message as Twilio answers it: `queued` when sent
 * from a number, `accepted` with no sender and 0 segments yet when sent through a Messaging Service
 * (the SDK's own description of `num_segments`).
 */
export function createMessage(account: Account, params: Record<string, unknown>): PlannedMessage {
  for (const name of Object.keys(params)) if (!KNOWN_PARAMETERS.has(name)) throw errors.unknownParameter(name)
  const to = single(params, 'To')
  const from = single(params, 'From')
  const service = single(params, 'MessagingServiceSid')
  const body = single(params, 'Body')
  const statusCallback = single(params, 'StatusCallback')

  if (to === undefined) throw errors.toRequired()
  if (from === undefined && service === undefined) throw errors.fromRequired()
  if (body === undefined) throw errors.bodyRequired()
  if ([...body].length > MAX_BODY_CHARACTERS) throw errors.bodyTooLong()
  if (service !== undefined && !MESSAGING_SERVICE_SID.test(service)) throw errors.invalidMessagingService(service)
  if (from !== undefined) {
    const refusal = fromRefusal(from)
    if (refusal) throw refusal
    if (!E164.test(from) && !ALPHANUMERIC_SENDER.test(from)) throw errors.invalidFrom(from)
  }
  if (!E164.test(to)) throw errors.invalidTo(to)
  const refusal = toRefusal(to, from ?? service ?? '')
  if (refusal) throw refusal
  if (statusCallback !== undefined) checkStatusCallback(statusCallback)

  const sid = newSid('SM')
  const now = Date.now()
  const uri = `/${API_VERSION}/Accounts/${account.sid}/Messages/${sid}.json`
  const viaService = service !== undefined
  const status: MessageStatus = viaService ? 'accepted' : 'queued'
  const message: MessageJson = {
    account_sid: account.sid,
    api_version: API_VERSION,
    body,
    date_created: rfc2822(now),
    date_sent: null,
    date_updated: rfc2822(now),
    direction: 'outbound-api',
    error_code: null,
    error_message: null,
    from: from ?? null,
    messaging_service_sid: service ?? null,
    num_media: '0',
    num_segments: viaService ? '0' : String(smsSegments(body).segments),
    price: null,
    price_unit: 'USD',
    sid,
    status,
    subresource_uris: { media: uri.replace(/\.json$/, '/Media.json') },
    to,
    uri,
  }
  const failure = DELIVERY_FAILURES[to]
  return {
    record: {
      sid,
      accountSid: account.sid,
      receivedAt: now,
      message,
      statusCallback: statusCallback ?? null,
      history: [{ status, at: new Date(now).toISOString() }],
      callbacks: [],
      removed: false,
    },
    plan: [...(viaService ? (['queued'] as const) : []), 'sending', 'sent', failure ? 'undelivered' : 'delivered'],
    failure,
  }
}

/** The fake posts only to this machine, so a callback anywhere else is refused now rather than dropped later. */
function checkStatusCallback(url: string): void {
  if (!URL.canParse(url)) throw errors.invalidStatusCallback(`${url} is not an absolute URL`)
  if (!isLoopbackUrl(url))
    throw errors.invalidStatusCallback(`${url} is not on this machine; the SMS fake posts only to 127.0.0.1, localhost or [::1]`)
}
