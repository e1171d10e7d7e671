import express, { type NextFunction, type Request, type Response } from 'express'
import { errors, FakeTwilioError } from './errors'
import type { MessageLifecycle } from './lifecycle'
import { createMessage } from './messages'
import { type Account, ACCOUNT_SID, type AccountStore, AUTH_TOKEN, newSid } from './state'

function send(res: Response, status: number, body: unknown): void {
  res.status(status).type('application/json').send(JSON.stringify(body))
}

/**
 * HTTP Basic with the account SID as user name and the auth token as password, the way the SDK
 * sends them (Twilio, "REST API: Authentication"). The SID in the credentials must be the one in
 * the URL. A SID's first request fixes its token, as an account's token is fixed at Twilio; a later
 * request with another token is refused like a wrong password.
 */
function accountOf(store: AccountStore, req: Request): Account {
  const basic = /^Basic\s+(\S+)\s*$/i.exec(req.get('authorization') ?? '')
  if (!basic) throw errors.authenticate('send the account SID and auth token with HTTP Basic authentication')
  const credentials = Buffer.from(basic[1] ?? '', 'base64').toString('utf8')
  const colon = credentials.indexOf(':')
  const sid = colon < 0 ? credentials : credentials.slice(0, colon)
  const token = colon < 0 ? '' : credentials.slice(colon + 1)
  if (!ACCOUNT_SID.test(sid)) throw errors.authenticate('the user name must be an account SID (AC and 32 hex digits)')
  if (!AUTH_TOKEN.test(token)) throw errors.authenticate('the password must be an auth token (32 hex digits)')
  if (sid !== req.params.accountSid) throw errors.authenticate('the credentials are not those of the account in the URL')
  const account = store.signIn(sid, token)
  if (!account) throw errors.authenticate('wrong auth token for this account')
  return account
}

/** The Messages API of Twilio's REST API 2010-04-01, for the subset the product uses (see docker-free-dev/README.md). */
export function createApiRouter({ store, lifecycle, log }: { store: AccountStore; lifecycle: MessageLifecycle; log(line: string): void }) {
  const router = express.Router()
  router.use(express.urlencoded({ extended: false, limit: '64kb' }))

  const handle = (method: 'get' | 'post', path: string, status: number, handler: (account: Account, req: Request) => unknown) => {
    router[method](path, (req: Request, res: Response) => {
      res.set('Twilio-Request-Id', newSid('RQ'))
      try {
        const account = accountOf(store, req)
        send(res, status, handler(account, req))
      } catch (err) {
        if (!(err instanceof FakeTwilioError)) throw err
        if (err.status === 401) res.set('WWW-Authenticate', 'Basic realm="Twilio API"')
        send(res, err.status, err.toBody())
      }
    })
  }

  handle('post', '/Accounts/:accountSid/Messages.json', 201, (account, req) => {
    const planned = createMessage(account, typeof req.body === 'object' && req.body !== null ? req.body : {})
    store.add(account, planned.record)
    lifecycle.start(account, planned)
    return planned.record.message
  })
  handle('get', '/Accounts/:accountSid/Messages/:sid.json', 200, (account, req) => {
    const record = account.messages.get(String(req.params.sid))
    if (!record) throw errors.notFound(`${req.baseUrl}${req.path}`)
    return record.message
  })

  router.use((req: Request, res: Response) => {
    const err = errors.notFound(`${req.baseUrl}${req.path}`)
    send(res, err.status, err.toBody())
  })
  router.use((err: unknown, _req: Request, res: Response, _next: NextFunction) => {
    const status = typeof err === 'object' && err !== null && 'status' in err && typeof err.status === 'number' ? err.status : 500
    if (status < 500) {
      send(res, 400, new FakeTwilioError(400, 20001, 'Send parameters form-encoded (application/x-www-form-urlencoded).').toBody())
      return
    }
    log(`SMS fake failed on a request: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}`)
    send(res, 500, new FakeTwilioError(500, 20500, 'The SMS fake failed on this request; its log says why.').toBody())
  })
  return router
}
