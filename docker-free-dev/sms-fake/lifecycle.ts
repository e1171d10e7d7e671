import { smsSegments } from '../../shared/sms'
import type { StatusCallbackDispatcher } from './callbacks'
import { MAGIC_FROM } from './magic-numbers'
import type { PlannedMessage } from './messages'
import { type Account, API_VERSION, type MessageRecord, type MessageStatus, rfc2822 } from './state'

/**
 * Moves accepted messages along their statuses, one step every `stepMs` (Twilio, "Message resource",
 * "Message status values": accepted → queued for a Messaging Service, queued → sending → sent, then
 * delivered or undelivered on the carrier's report), and posts each change to the message's
 * StatusCallback. The status a message was created with is in the create answer, so only later
 * changes are posted.
 */
export class MessageLifecycle {
  private readonly timers = new Set<NodeJS.Timeout>()

  constructor(
    private readonly stepMs: number,
    private readonly callbacks: StatusCallbackDispatcher,
  ) {}

  start(account: Account, { record, plan, failure }: PlannedMessage): void {
    const [next, ...rest] = plan
    if (next === undefined || record.removed) return
    const timer = setTimeout(() => {
      this.timers.delete(timer)
      if (record.removed) return
      this.advance(account, record, next, failure && next === 'undelivered' ? failure : undefined)
      this.start(account, { record, plan: rest, failure })
    }, this.stepMs)
    this.timers.add(timer)
  }

  private advance(account: Account, record: MessageRecord, status: MessageStatus, failure: PlannedMessage['failure']): void {
    const now = Date.now()
    const message = record.message
    // A Messaging Service picks the sender when it queues the message; the fake's service always picks Twilio's valid test number.
    if (status === 'queued' && message.from === null) message.from = MAGIC_FROM.valid
    if (status === 'queued') message.num_segments = String(smsSegments(message.body ?? '').segments)
    if (status === 'sent') message.date_sent = rfc2822(now)
    if (failure) {
      message.error_code = failure.errorCode
      message.error_message = failure.errorMessage
    }
    message.status = status
    message.date_updated = rfc2822(now)
    record.history.push({ status, at: new Date(now).toISOString() })
    if (record.statusCallback === null) return

    // The parameters of Twilio's SMS status callbacks (Twilio, "Track the message status of outbound messages"; from memory).
    const params: Record<string, string> = {
      AccountSid: account.sid,
      ApiVersion: API_VERSION,
      From: message.from ?? '',
      MessageSid: record.sid,
      MessageStatus: status,
      SmsSid: record.sid,
      SmsStatus: status,
      To: message.to ?? '',
    }
    if (message.messaging_service_sid) params.MessagingServiceSid = message.messaging_service_sid
    if (message.error_code !== null) params.ErrorCode = String(message.error_code)
    this.callbacks.send({ record, url: record.statusCallback, authToken: account.authToken, status, params })
  }

  close(): void {
    for (const t of this.timers) clearTimeout(t)
    this.timers.clear()
  }
}
