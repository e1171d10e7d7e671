import twilio from 'twilio'
import { afterEach, describe, expect, it, vi } from 'vitest'
import { createSmsFake, type SmsFakeOptions } from '../../docker-free-dev/sms-fake/server'
import { verifyStatusCallback } from '../../server/lib/sms'
import {
  type CallbackReceiver,
  type Credentials,
  DRAMA_MOBILE,
  freshAccount,
  inspected,
  type ReceivedCallback,
  smsFor,
  startCallbackReceiver,
  VALID_FROM,
} from './sms-fake-helpers'

/**
 * Status callbacks. Sources: Twilio, "Track the message status of outbound messages" (a form-encoded
 * POST to StatusCallback for each status change, with MessageSid, MessageStatus, AccountSid, From, To
 * and ErrorCode on failure; parameter list from memory) and "Webhooks security"
 * (https://www.twilio.com/docs/usage/webhooks/webhooks-security: X-Twilio-Signature is base64 of an
 * HMAC-SHA1, keyed with the auth token, of the full URL followed by each POST parameter's name and
 * value sorted by name). The check is the SDK's own `twilio.validateRequest`.
 */
describe('SMS fake: status callbacks', () => {
  const cleanup: Array<() => Promise<void>> = []
  afterEach(async () => {
    for (const fn of cleanup.splice(0)) await fn()
  })

  async function fakeWith(options: SmsFakeOptions = {}): Promise<string> {
    const running = await createSmsFake({ stepMs: 10, callbackBackoffMs: 20, ...options }).listen()
    cleanup.push(() => running.close())
    return running.url
  }

  async function receiverWith(statuses: number[] = []): Promise<CallbackReceiver> {
    const receiver = await startCallbackReceiver(statuses)
    cleanup.push(() => receiver.close())
    return receiver
  }

  const statusesOf = (received: ReceivedCallback[]) => received.map((r) => r.params.MessageStatus)
  const isSigned = (account: Credentials, r: ReceivedCallback) => twilio.validateRequest(account.authToken, r.signature, r.url, r.params)

  it('posts every change after the create, in order, form-encoded and signed as Twilio signs', async () => {
    const base = await fakeWith()
    const receiver = await receiverWith()
    const account = freshAccount()
    const { sid } = await smsFor(account, base).messages.create({
      to: DRAMA_MOBILE,
      from: VALID_FROM,
      body: 'Your estimate is ready',
      statusCallback: receiver.url,
    })

    await vi.waitFor(() => expect(receiver.received).toHaveLength(3))
    expect(statusesOf(receiver.received)).toEqual(['sending', 'sent', 'delivered'])
    for (const r of receiver.received) {
      expect(r.url).toBe(receiver.url)
      expect(r.headers['content-type']).toMatch(/^application\/x-www-form-urlencoded/)
      expect(r.headers['user-agent']).toMatch(/^TwilioProxy\//)
      expect(r.params).toEqual({
        AccountSid: account.accountSid,
        ApiVersion: '2010-04-01',
        From: VALID_FROM,
        MessageSid: sid,
        MessageStatus: r.params.MessageStatus,
        SmsSid: sid,
        SmsStatus: r.params.MessageStatus,
        To: DRAMA_MOBILE,
      })
      expect(isSigned(account, r)).toBe(true)
      expect(verifyStatusCallback(account.authToken, r.signature, r.url, r.params)).toBe(true)
    }
  })

  it('a tampered callback fails the SDK’s check: changed status, changed URL, wrong token, extra or missing parameter', async () => {
    const base = await fakeWith()
    const receiver = await receiverWith()
    const account = freshAccount()
    await smsFor(account, base).messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: 'Ready', statusCallback: receiver.url })
    await vi.waitFor(() => expect(receiver.received).toHaveLength(3))
    const delivered = receiver.received[2]
    if (!delivered) throw new Error('no delivered callback')
    const { authToken } = account
    const check = (change: Partial<Pick<ReceivedCallback, 'url' | 'params' | 'signature'>>, token = authToken) =>
      twilio.validateRequest(token, change.signature ?? delivered.signature, change.url ?? delivered.url, change.params ?? delivered.params)

    expect(check({})).toBe(true)
    expect(check({ params: { ...delivered.params, MessageStatus: 'undelivered' } })).toBe(false)
    expect(check({ params: { ...delivered.params, ErrorCode: '30003' } })).toBe(false)
    const { To: _to, ...withoutTo } = delivered.params
    expect(check({ params: withoutTo })).toBe(false)
    expect(check({ url: delivered.url.replace('estimate=e1', 'estimate=e2') })).toBe(false)
    expect(check({ url: delivered.url.replace('/api/sms/status', '/api/sms/other') })).toBe(false)
    expect(check({}, freshAccount().authToken)).toBe(false)
    // A signature made for another callback of the same message does not carry over.
    expect(check({ signature: receiver.received[0]?.signature ?? '' })).toBe(false)
    expect(verifyStatusCallback(authToken, undefined, delivered.url, delivered.params)).toBe(false)
  })

  it('reports a text that was not delivered with its ErrorCode (the fake’s +15005550010: 30003)', async () => {
    const base = await fakeWith()
    const receiver = await receiverWith()
    const account = freshAccount()
    await smsFor(account, base).messages.create({ to: '+15005550010', from: VALID_FROM, body: 'Ready', statusCallback: receiver.url })
    await vi.waitFor(() => expect(receiver.received).toHaveLength(3))
    expect(statusesOf(receiver.received)).toEqual(['sending', 'sent', 'undelivered'])
    expect(receiver.received.map((r) => r.params.ErrorCode)).toEqual([undefined, undefined, '30003'])
    expect(receiver.received.every((r) => isSigned(account, r))).toBe(true)
  })

  it('through a Messaging Service the move to queued is posted too, with the service SID', async () => {
    const base = await fakeWith()
    const receiver = await receiverWith()
    const messagingServiceSid = `MG${'cd'.repeat(16)}`
    await smsFor(freshAccount(), base).messages.create({
      to: DRAMA_MOBILE,
      messagingServiceSid,
      body: 'Ready',
      statusCallback: receiver.url,
    })
    await vi.waitFor(() => expect(receiver.received).toHaveLength(4))
    expect(statusesOf(receiver.received)).toEqual(['queued', 'sending', 'sent', 'delivered'])
    expect(receiver.received.every((r) => r.params.MessagingServiceSid === messagingServiceSid && r.params.From === VALID_FROM)).toBe(true)
  })

  it('retries a failing callback with doubling delays, holding back later statuses until it is received', async () => {
    const base = await fakeWith({ callbackBackoffMs: 60, callbackMaxAttempts: 5 })
    const receiver = await receiverWith([500, 503])
    const account = freshAccount()
    const { sid } = await smsFor(account, base).messages.create({
      to: DRAMA_MOBILE,
      from: VALID_FROM,
      body: 'Ready',
      statusCallback: receiver.url,
    })

    await vi.waitFor(() => expect(receiver.received).toHaveLength(5))
    expect(statusesOf(receiver.received)).toEqual(['sending', 'sending', 'sending', 'sent', 'delivered'])
    const [first, second, third] = receiver.received
    if (!first || !second || !third) throw new Error('missing attempts')
    // 60 ms, then 120 ms (a timer may fire a millisecond early).
    expect(second.at - first.at).toBeGreaterThanOrEqual(59)
    expect(third.at - second.at).toBeGreaterThanOrEqual(119)
    expect(new Set([first, second, third].map((r) => r.headers['i-twilio-idempotency-token'])).size).toBe(1)
    expect(receiver.received.every((r) => isSigned(account, r))).toBe(true)

    await vi.waitFor(async () => {
      const [view] = await inspected({ account_sid: account.accountSid }, base)
      expect(view?.sid).toBe(sid)
      expect(view?.status_callback_attempts.map((a) => [a.status, a.attempt, a.http_status, a.succeeded])).toEqual([
        ['sending', 1, 500, false],
        ['sending', 2, 503, false],
        ['sending', 3, 200, true],
        ['sent', 1, 200, true],
        ['delivered', 1, 200, true],
      ])
    })
  })

  it('gives up on a callback after the configured attempts and goes on to the next status', async () => {
    const base = await fakeWith({ callbackMaxAttempts: 2, callbackBackoffMs: 10 })
    const receiver = await receiverWith(Array.from({ length: 10 }, () => 500))
    await smsFor(freshAccount(), base).messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: 'Ready', statusCallback: receiver.url })
    await vi.waitFor(() => expect(receiver.received).toHaveLength(6))
    await new Promise((r) => setTimeout(r, 200))
    expect(statusesOf(receiver.received)).toEqual(['sending', 'sending', 'sent', 'sent', 'delivered', 'delivered'])
  })

  it('posts nothing when no StatusCallback was given', async () => {
    const base = await fakeWith()
    const account = freshAccount()
    await smsFor(account, base).messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: 'Ready' })
    await vi.waitFor(async () => expect((await inspected({ account_sid: account.accountSid }, base))[0]?.status).toBe('delivered'))
    expect((await inspected({ account_sid: account.accountSid }, base))[0]?.status_callback_attempts).toEqual([])
  })
})
