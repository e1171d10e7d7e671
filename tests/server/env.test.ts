import { describe, expect, it } from 'vitest'
import { EnvError, loadEnv, LOCAL_TWILIO_ACCOUNT_SID, LOCAL_TWILIO_AUTH_TOKEN, LOCAL_TWILIO_FROM } from '../../server/env'

const base = { DATABASE_URL: 'postgres://u:p@127.0.0.1:5432/tickover_test' }

function fieldsOf(fn: () => unknown): string[] {
  try {
    fn()
  } catch (err) {
    if (err instanceof EnvError) return err.fields.map((f) => f.field)
    throw err
  }
  throw new Error('expected an EnvError')
}

describe('environment validation', () => {
  it('applies defaults for a minimal environment', () => {
    const env = loadEnv(base)
    expect(env).toMatchObject({ PORT: 3000, HOST: '127.0.0.1', SMTP_PORT: 1025, SMTP_SECURE: false })
    expect(env.PUBLIC_BASE_URL).toBe('http://127.0.0.1:3000')
  })

  it.each([
    [{}, ['DATABASE_URL']],
    [{ DATABASE_URL: 'mysql://x@h/db' }, ['DATABASE_URL']],
    [{ ...base, PORT: '70000' }, ['PORT']],
    [{ ...base, PORT: 'abc', SMTP_SECURE: 'perhaps' }, ['PORT', 'SMTP_SECURE']],
    [{ ...base, PUBLIC_BASE_URL: 'ftp://example.test' }, ['PUBLIC_BASE_URL']],
    [{ ...base, LOG_LEVEL: 'loud' }, ['LOG_LEVEL']],
  ])('names every bad field: %j', (input, fields) => {
    expect(fieldsOf(() => loadEnv(input)).sort()).toEqual([...fields].sort())
  })

  it('treats empty values as unset', () => {
    expect(loadEnv({ ...base, PORT: '' }).PORT).toBe(3000)
  })

  it('drops a trailing slash from the public base URL', () => {
    expect(loadEnv({ ...base, PUBLIC_BASE_URL: 'https://shop.example.test/' }).PUBLIC_BASE_URL).toBe('https://shop.example.test')
  })
})

describe('text message settings', () => {
  // What production must have already for payments, so that only the text message fields are missing below.
  const production = {
    ...base,
    NODE_ENV: 'production',
    STRIPE_SECRET_KEY: 'sk_live_abc',
    STRIPE_WEBHOOK_SECRET: 'whsec_abc',
  }
  const twilio = {
    TWILIO_ACCOUNT_SID: `AC${'1a'.repeat(16)}`,
    TWILIO_AUTH_TOKEN: '2b'.repeat(16),
    TWILIO_FROM: '+447700900123',
  }

  it('outside production uses credentials only the local SMS fake accepts, and the fake the local scripts started', () => {
    const env = loadEnv({ ...base, SMS_FAKE_URL: 'http://127.0.0.1:12112' })
    expect(env).toMatchObject({
      TWILIO_ACCOUNT_SID: LOCAL_TWILIO_ACCOUNT_SID,
      TWILIO_AUTH_TOKEN: LOCAL_TWILIO_AUTH_TOKEN,
      TWILIO_FROM: LOCAL_TWILIO_FROM,
      TWILIO_API_BASE: 'http://127.0.0.1:12112',
    })
    expect(loadEnv(base).TWILIO_API_BASE).toBeUndefined()
  })

  it('requires the account, token and sender in production', () => {
    expect(fieldsOf(() => loadEnv(production)).sort()).toEqual(['TWILIO_ACCOUNT_SID', 'TWILIO_AUTH_TOKEN', 'TWILIO_FROM'])
    expect(loadEnv({ ...production, ...twilio })).toMatchObject(twilio)
  })

  it('in production talks to Twilio unless TWILIO_API_BASE says otherwise, whatever SMS_FAKE_URL holds', () => {
    expect(loadEnv({ ...production, ...twilio, SMS_FAKE_URL: 'http://127.0.0.1:12112' }).TWILIO_API_BASE).toBeUndefined()
    expect(
      loadEnv({ ...production, ...twilio, TWILIO_API_BASE: 'http://127.0.0.1:4010', SMS_FAKE_URL: 'http://127.0.0.1:12112' })
        .TWILIO_API_BASE,
    ).toBe('http://127.0.0.1:4010')
  })

  it('takes a Messaging Service SID as the sender', () => {
    expect(loadEnv({ ...base, TWILIO_FROM: `MG${'3c'.repeat(16)}` }).TWILIO_FROM).toBe(`MG${'3c'.repeat(16)}`)
  })

  it.each([
    // Account SIDs are AC + 32 hex digits; an API key SID (SK…) is not one (Twilio, "API keys").
    [{ TWILIO_ACCOUNT_SID: `SK${'1a'.repeat(16)}` }, ['TWILIO_ACCOUNT_SID']],
    [{ TWILIO_ACCOUNT_SID: 'AC123' }, ['TWILIO_ACCOUNT_SID']],
    [{ TWILIO_AUTH_TOKEN: 'secret' }, ['TWILIO_AUTH_TOKEN']],
    // The sender must already be E.164, not the national form a person types.
    [{ TWILIO_FROM: '07700 900123' }, ['TWILIO_FROM']],
    [{ TWILIO_FROM: 'MG123' }, ['TWILIO_FROM']],
    [{ TWILIO_API_BASE: 'ftp://127.0.0.1' }, ['TWILIO_API_BASE']],
    [{ SMS_FAKE_URL: 'not a url' }, ['SMS_FAKE_URL']],
  ])('names a bad value: %j', (input, fields) => {
    expect(fieldsOf(() => loadEnv({ ...base, ...input })).sort()).toEqual(fields)
  })
})
