import twilio from 'twilio'
import { describe, expect, it, vi } from 'vitest'
import { DRAMA_MOBILE, freshAccount, smsFor, VALID_FROM } from './sms-fake-helpers'

/**
 * Twilio's magic numbers for test credentials, from Twilio docs, "Test Credentials", section "Test
 * SMS messages" (https://www.twilio.com/docs/iam/test-credentials). The numbers and their error
 * codes are from memory of that table (the page's introduction was read for this work); they agree
 * with the copy of the table in the `twilio_magic_values` Elixir package.
 */

async function codeOf(pending: Promise<unknown>): Promise<[number, number]> {
  const err = await pending.then(
    () => undefined,
    (e: unknown) => e,
  )
  if (!(err instanceof twilio.RestException)) throw new Error(`expected a RestException, got ${String(err)}`)
  return [err.status, err.code ?? 0]
}

describe('SMS fake: Twilio’s magic numbers', () => {
  it.each([
    { from: '+15005550001', code: 21212, meaning: 'invalid sender' },
    { from: '+15005550007', code: 21606, meaning: 'not owned by the account, or not SMS-capable' },
    { from: '+15005550008', code: 21611, meaning: 'SMS queue full' },
  ])('From $from ($meaning) is refused with $code', async ({ from, code }) => {
    expect(await codeOf(smsFor(freshAccount()).messages.create({ to: DRAMA_MOBILE, from, body: 'Hello' }))).toEqual([400, code])
  })

  it.each([
    { to: '+15005550001', code: 21211, meaning: 'invalid number' },
    { to: '+15005550002', code: 21612, meaning: 'cannot route' },
    { to: '+15005550003', code: 21408, meaning: 'no international permission' },
    { to: '+15005550004', code: 21610, meaning: 'blocked (unsubscribed)' },
    { to: '+15005550009', code: 21614, meaning: 'not SMS-capable' },
  ])('To $to ($meaning) is refused with $code', async ({ to, code }) => {
    expect(await codeOf(smsFor(freshAccount()).messages.create({ to, from: VALID_FROM, body: 'Hello' }))).toEqual([400, code])
  })

  it('From +15005550006 passes every check', async () => {
    expect((await smsFor(freshAccount()).messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: 'Hello' })).status).toBe('queued')
  })

  // Not Twilio's: test credentials never reach a handset, so the fake picks these for a text that is sent and not delivered.
  it.each([
    { to: '+15005550010', errorCode: 30003, errorMessage: 'Unreachable destination handset' },
    { to: '+15005550011', errorCode: 30005, errorMessage: 'Unknown destination handset' },
  ])('To $to is accepted, sent, then undelivered with error $errorCode', async ({ to, errorCode, errorMessage }) => {
    const client = smsFor(freshAccount())
    const { sid, status } = await client.messages.create({ to, from: VALID_FROM, body: 'Your estimate is ready' })
    expect(status).toBe('queued')
    await vi.waitFor(async () => expect((await client.messages(sid).fetch()).status).toBe('undelivered'), { timeout: 5_000 })
    const message = await client.messages(sid).fetch()
    expect({ errorCode: message.errorCode, errorMessage: message.errorMessage }).toEqual({ errorCode, errorMessage })
    expect(message.dateSent).toBeInstanceOf(Date)
  })
})
