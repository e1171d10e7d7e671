import { describe, expect, it } from 'vitest'
import { EnvError, loadEnv } from '../../server/env'

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
