import twilio from 'twilio'
import type { MessageListInstanceCreateOptions } from 'twilio/lib/rest/api/v2010/account/message'
import { describe, expect, it, vi } from 'vitest'
import { DRAMA_MOBILE, freshAccount, smsFakeUrl, smsFor, VALID_FROM } from './sms-fake-helpers'

/**
 * The Messages API driven through the official SDK, as the server will drive it. Shapes and
 * statuses follow Twilio's "Message resource" (https://www.twilio.com/docs/messaging/api/message-resource);
 * error codes follow Twilio's "Error and warning dictionary" (https://www.twilio.com/docs/api/errors).
 */

async function refusal(pending: Promise<unknown>): Promise<twilio.RestException> {
  const err = await pending.then(
    () => undefined,
    (e: unknown) => e,
  )
  if (!(err instanceof twilio.RestException)) throw new Error(`expected a RestException, got ${String(err)}`)
  return err
}

function basicAuth(accountSid: string, authToken: string): string {
  return `Basic ${Buffer.from(`${accountSid}:${authToken}`).toString('base64')}`
}

describe('SMS fake: creating and fetching messages', () => {
  it('answers a create with a queued Message resource', async () => {
    const account = freshAccount()
    const before = Date.now()
    const message = await smsFor(account).messages.create({
      to: DRAMA_MOBILE,
      from: VALID_FROM,
      body: 'Your Defender is ready to collect.',
    })
    expect(message.sid).toMatch(/^SM[0-9a-f]{32}$/)
    expect(message).toMatchObject({
      accountSid: account.accountSid,
      apiVersion: '2010-04-01',
      body: 'Your Defender is ready to collect.',
      direction: 'outbound-api',
      from: VALID_FROM,
      to: DRAMA_MOBILE,
      status: 'queued',
      numSegments: '1',
      numMedia: '0',
      price: null,
      priceUnit: 'USD',
      errorCode: null,
      errorMessage: null,
      messagingServiceSid: null,
      dateSent: null,
      uri: `/2010-04-01/Accounts/${account.accountSid}/Messages/${message.sid}.json`,
    })
    // RFC 2822 dates carry whole seconds.
    expect(message.dateCreated.getTime()).toBeGreaterThanOrEqual(Math.floor(before / 1000) * 1000)
    expect(message.dateCreated.getTime()).toBeLessThanOrEqual(Date.now())
  })

  it('speaks Twilio’s wire format: 201, snake_case fields, RFC 2822 dates, form-encoded parameters', async () => {
    const { accountSid, authToken } = freshAccount()
    const res = await fetch(`${smsFakeUrl()}/2010-04-01/Accounts/${accountSid}/Messages.json`, {
      method: 'POST',
      headers: { Authorization: basicAuth(accountSid, authToken) },
      body: new URLSearchParams({ To: DRAMA_MOBILE, From: VALID_FROM, Body: 'MOT due next week' }),
    })
    expect(res.status).toBe(201)
    expect(res.headers.get('twilio-request-id')).toMatch(/^RQ[0-9a-f]{32}$/)
    const json = (await res.json()) as Record<string, unknown>
    expect(json).toMatchObject({ account_sid: accountSid, num_segments: '1', status: 'queued', date_sent: null, price: null })
    expect(json.date_created).toMatch(/^[A-Z][a-z]{2}, \d{2} [A-Z][a-z]{2} \d{4} \d{2}:\d{2}:\d{2} \+0000$/)
    expect(json.subresource_uris).toEqual({ media: `/2010-04-01/Accounts/${accountSid}/Messages/${String(json.sid)}/Media.json` })
  })

  it('moves the message along to delivered, which a fetch then shows', async () => {
    const client = smsFor(freshAccount())
    const { sid } = await client.messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: 'Parts have arrived.' })
    await vi.waitFor(async () => expect((await client.messages(sid).fetch()).status).toBe('delivered'), { timeout: 5_000 })
    const delivered = await client.messages(sid).fetch()
    expect(delivered.dateSent).toBeInstanceOf(Date)
    expect(delivered.errorCode).toBeNull()
  })

  it('counts segments the way shared/sms.ts does: 161 GSM-7 characters are two, an em dash makes it UCS-2', async () => {
    const client = smsFor(freshAccount())
    // 160 septets fit one GSM-7 segment, 153 each once concatenated (Twilio, "What the heck is a segment?").
    expect((await client.messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: 'a'.repeat(161) })).numSegments).toBe('2')
    // The em dash is outside GSM 03.38, so 71 UCS-2 units: more than 70, two segments of 67.
    expect((await client.messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: `—${'a'.repeat(70)}` })).numSegments).toBe('2')
  })

  it('through a Messaging Service: accepted with no sender and 0 segments, then queued with both', async () => {
    const client = smsFor(freshAccount())
    const messagingServiceSid = `MG${'ab'.repeat(16)}`
    // The SDK documents num_segments as "initially 0" for messages sent via a Messaging Service.
    const message = await client.messages.create({ to: DRAMA_MOBILE, messagingServiceSid, body: 'Booked in for Tuesday.' })
    expect(message).toMatchObject({ status: 'accepted', from: null, numSegments: '0', messagingServiceSid })
    await vi.waitFor(async () => expect((await client.messages(message.sid).fetch()).status).toBe('delivered'), { timeout: 5_000 })
    expect(await client.messages(message.sid).fetch()).toMatchObject({ from: VALID_FROM, numSegments: '1' })
  })

  it('answers 404 with code 20404 for an unknown message and for another account’s', async () => {
    const owner = smsFor(freshAccount())
    const { sid } = await owner.messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: 'Private to this workshop' })
    const unknown = await refusal(owner.messages(`SM${'0'.repeat(32)}`).fetch())
    expect({ status: unknown.status, code: unknown.code, moreInfo: unknown.moreInfo }).toEqual({
      status: 404,
      code: 20404,
      moreInfo: 'https://www.twilio.com/docs/errors/20404',
    })
    const other = await refusal(smsFor(freshAccount()).messages(sid).fetch())
    expect([other.status, other.code]).toEqual([404, 20404])
  })
})

describe('SMS fake: authentication (HTTP Basic, account SID and auth token)', () => {
  it('refuses a wrong auth token for a known account with 401, code 20003', async () => {
    const account = freshAccount()
    await smsFor(account).messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: 'first request fixes the token' })
    const err = await refusal(
      smsFor({ ...account, authToken: freshAccount().authToken }).messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: 'x' }),
    )
    expect([err.status, err.code]).toEqual([401, 20003])
  })

  it.each([
    ['no credentials', undefined],
    ['a token that is not 32 hex digits', 'not-a-token'],
  ])('refuses %s', async (_what, token) => {
    const { accountSid } = freshAccount()
    const res = await fetch(`${smsFakeUrl()}/2010-04-01/Accounts/${accountSid}/Messages.json`, {
      method: 'POST',
      headers: token === undefined ? {} : { Authorization: basicAuth(accountSid, token) },
      body: new URLSearchParams({ To: DRAMA_MOBILE, From: VALID_FROM, Body: 'x' }),
    })
    expect(res.status).toBe(401)
    expect(res.headers.get('www-authenticate')).toMatch(/^Basic/)
    expect(await res.json()).toMatchObject({ code: 20003, status: 401, more_info: 'https://www.twilio.com/docs/errors/20003' })
  })

  it('refuses credentials of one account used on another account’s URL', async () => {
    const mine = freshAccount()
    const res = await fetch(`${smsFakeUrl()}/2010-04-01/Accounts/${freshAccount().accountSid}/Messages.json`, {
      method: 'POST',
      headers: { Authorization: basicAuth(mine.accountSid, mine.authToken) },
      body: new URLSearchParams({ To: DRAMA_MOBILE, From: VALID_FROM, Body: 'x' }),
    })
    expect(res.status).toBe(401)
  })
})

describe('SMS fake: refusals in Twilio’s error shape', () => {
  it.each<[string, Partial<MessageListInstanceCreateOptions>, number]>([
    ['no body', { body: undefined }, 21602],
    ['an empty body', { body: '' }, 21602],
    ['a body over 1600 characters', { body: 'a'.repeat(1601) }, 21617],
    ['no sender', { from: undefined }, 21603],
    ['a To that is not E.164', { to: '07700 900123' }, 21211],
    ['a sender that is neither a number nor an alphanumeric ID', { from: 'not-a-sender!' }, 21212],
    ['a malformed Messaging Service SID', { from: undefined, messagingServiceSid: 'MG123' }, 21701],
    ['a StatusCallback that is not a URL', { statusCallback: 'status' }, 21609],
    ['a StatusCallback off this machine', { statusCallback: 'https://workshop.example/api/sms/status' }, 21609],
    ['a parameter the fake does not implement', { mediaUrl: ['https://workshop.example/photo.jpg'] }, 20001],
  ])('%s: 400 with code %i', async (_what, change, code) => {
    const err = await refusal(smsFor(freshAccount()).messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: 'Hello', ...change }))
    expect([err.status, err.code, err.moreInfo]).toEqual([400, code, `https://www.twilio.com/docs/errors/${code}`])
    expect(err.message).not.toBe('')
  })

  it('accepts an alphanumeric sender ID', async () => {
    const message = await smsFor(freshAccount()).messages.create({ to: DRAMA_MOBILE, from: 'TICKOVER', body: 'Hello' })
    expect(message.from).toBe('TICKOVER')
  })

  it('answers 404 with code 20404 for an endpoint it does not have', async () => {
    const { accountSid, authToken } = freshAccount()
    const res = await fetch(`${smsFakeUrl()}/2010-04-01/Accounts/${accountSid}/Calls.json`, {
      headers: { Authorization: basicAuth(accountSid, authToken) },
    })
    expect(res.status).toBe(404)
    expect(await res.json()).toMatchObject({ code: 20404, status: 404 })
  })
})
