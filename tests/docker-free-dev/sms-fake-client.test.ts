import twilio from 'twilio'
import { describe, expect, it } from 'vitest'
import { LOCAL_TWILIO_ACCOUNT_SID, LOCAL_TWILIO_AUTH_TOKEN } from '../../server/env'
import { createSmsClient } from '../../server/lib/sms'
import { DRAMA_MOBILE, freshAccount, inspected, smsFakeUrl, VALID_FROM } from './sms-fake-helpers'

/** server/lib/sms.ts: the official SDK, pointed at the fake through its own `httpClient` option (twilio-node, ClientOpts.httpClient). */
describe('createSmsClient', () => {
  it('sends the SDK’s requests to the fake given as apiBase, with the SDK’s own headers', async () => {
    const account = freshAccount()
    const client = createSmsClient({ ...account, apiBase: smsFakeUrl() })
    expect(client.httpClient).toBeInstanceOf(twilio.RequestClient)
    const message = await client.messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: 'Through the SDK' })
    expect((await inspected({ account_sid: account.accountSid })).map((m) => m.sid)).toEqual([message.sid])
    // The SDK's RequestClient keeps what it last sent: Twilio's path on the fake's origin.
    expect(client.httpClient.lastRequest?.url).toBe(`${smsFakeUrl()}/2010-04-01/Accounts/${account.accountSid}/Messages.json`)
    expect(client.httpClient.lastRequest?.headers).toMatchObject({ 'User-Agent': expect.stringMatching(/^twilio-node\/6\.2\.0 /) })
  })

  it('refuses to send a stand-in request to another Twilio product’s host', async () => {
    const client = createSmsClient({ ...freshAccount(), apiBase: smsFakeUrl() })
    await expect(client.lookups.v2.phoneNumbers(DRAMA_MOBILE).fetch()).rejects.toThrow(/speaks only Twilio's REST API/)
  })

  it('refuses an apiBase that is not an http(s) origin', () => {
    const account = freshAccount()
    expect(() => createSmsClient({ ...account, apiBase: `${smsFakeUrl()}/2010-04-01` })).toThrow(/without a path/)
    expect(() => createSmsClient({ ...account, apiBase: 'ftp://127.0.0.1' })).toThrow(/http or https/)
    expect(() => createSmsClient({ ...account, apiBase: 'not a url' })).toThrow(/not a URL/)
  })

  it('talks to Twilio itself when no apiBase is given, and never with the fake’s local credentials', () => {
    const client = createSmsClient(freshAccount())
    // The SDK's default client and base address (twilio-node: RequestClient, and Api's baseUrl).
    expect(client.httpClient.constructor).toBe(twilio.RequestClient)
    expect(client.api.baseUrl).toBe('https://api.twilio.com')
    expect(() => createSmsClient({ accountSid: LOCAL_TWILIO_ACCOUNT_SID, authToken: LOCAL_TWILIO_AUTH_TOKEN })).toThrow(
      /not a Twilio account/,
    )
    expect(() => createSmsClient({ accountSid: '', authToken: '' })).toThrow(/required/)
  })
})
