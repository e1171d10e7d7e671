import { createHmac } from 'node:crypto'

/**
 * The `X-Twilio-Signature` header as Twilio describes it (Twilio docs, "Webhooks security",
 * https://www.twilio.com/docs/usage/webhooks/webhooks-security): take the full URL the request goes
 * to, query string included; append each POST parameter's name and then its value, names sorted
 * case-sensitively (code-unit order, which for Twilio's ASCII names is the Unix sort the page asks
 * for); sign the result with HMAC-SHA1 keyed with the account's auth token; base64-encode it.
 * Written here from that description, not borrowed from the SDK, so that the SDK's
 * `validateRequest` checking it is a real test.
 */
export function twilioSignature(authToken: string, url: string, params: Record<string, string>): string {
  const data = Object.keys(params)
    .sort()
    .reduce((text, name) => `${text}${name}${params[name]}`, url)
  return createHmac('sha1', authToken).update(data, 'utf8').digest('base64')
}
