import twilio from 'twilio'
import type RequestClient from 'twilio/lib/base/RequestClient'
import type Response from 'twilio/lib/http/response'
import { LOCAL_TWILIO_ACCOUNT_SID } from '../env'

export interface SmsClientOptions {
  accountSid: string
  authToken: string
  /** e.g. "http://127.0.0.1:12112" for the local SMS fake; leave out to talk to Twilio. */
  apiBase?: string
}

// A text is accepted in well under a second; 20 s fails a hung request long before the SDK's default 30 s.
const TIMEOUT_MS = 20_000

/** The Messages API's host, with or without the edge and region the SDK may put in (api.dublin.ie1.twilio.com). */
const TWILIO_API_HOST = /^api(\.[a-z0-9-]+)*\.twilio\.com$/

/**
 * The SDK's own HTTP client with one change: requests for Twilio's REST API go to `base` instead,
 * same path and query, same Basic credentials and headers. Anything else the SDK might call
 * (another Twilio product's host) is refused, because the stand-in speaks only the Messages API.
 */
class StandInRequestClient extends twilio.RequestClient {
  constructor(private readonly base: URL) {
    // 429s mean "not accepted, try later", so retrying them cannot send a text twice.
    super({ timeout: TIMEOUT_MS, autoRetry: true })
  }

  override request<TData>(opts: RequestClient.RequestOptions<TData>): Promise<Response<TData>> {
    const target = new URL(opts.uri)
    if (!TWILIO_API_HOST.test(target.hostname)) {
      return Promise.reject(new Error(`The SMS stand-in at ${this.base.origin} speaks only Twilio's REST API, not ${target.origin}.`))
    }
    return super.request({ ...opts, uri: new URL(`${target.pathname}${target.search}`, this.base).href })
  }
}

/**
 * The server's Twilio client: the official SDK, pointed at the SMS fake through the SDK's own
 * `httpClient` option when `apiBase` is given, exactly as createStripeClient points Stripe at the
 * payments fake, so that the same calls run unchanged against Twilio when it is not. Send with
 * `client.messages.create({ to, from | messagingServiceSid, body, statusCallback })`.
 */
export function createSmsClient({ accountSid, authToken, apiBase }: SmsClientOptions): twilio.Twilio {
  if (!accountSid || !authToken)
    throw new Error('A Twilio account SID and auth token are required (TWILIO_ACCOUNT_SID, TWILIO_AUTH_TOKEN).')
  if (!apiBase) {
    if (accountSid === LOCAL_TWILIO_ACCOUNT_SID)
      throw new Error(
        'The SMS fake’s local credentials are not a Twilio account: set TWILIO_ACCOUNT_SID and TWILIO_AUTH_TOKEN, or TWILIO_API_BASE.',
      )
    return twilio(accountSid, authToken, { timeout: TIMEOUT_MS, autoRetry: true })
  }

  let base: URL
  try {
    base = new URL(apiBase)
  } catch {
    throw new Error(`TWILIO_API_BASE is not a URL: ${apiBase}`)
  }
  if (base.protocol !== 'http:' && base.protocol !== 'https:') throw new Error(`TWILIO_API_BASE must be http or https: ${apiBase}`)
  if (base.pathname !== '/' || base.search || base.hash) throw new Error(`TWILIO_API_BASE must be an origin without a path: ${apiBase}`)
  return twilio(accountSid, authToken, { httpClient: new StandInRequestClient(base) })
}

/**
 * Whether a status callback really comes from Twilio (or the SMS fake, which signs the same way):
 * `signature` is the X-Twilio-Signature header, `url` the full URL the callback was registered with
 * (built from PUBLIC_BASE_URL, never from the request's Host header, which a proxy may change),
 * `params` the form-decoded body. Checked with the SDK's own validateRequest.
 */
export function verifyStatusCallback(
  authToken: string,
  signature: string | undefined,
  url: string,
  params: Record<string, string>,
): boolean {
  if (!signature) return false
  return twilio.validateRequest(authToken, signature, url, params)
}
