import { afterEach, describe, expect, it, vi } from 'vitest'
import { ApiError, onUnauthorized, request } from '@/api/http'

function jsonResponse(status: number, body: unknown): Response {
  return new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json; charset=utf-8' } })
}

function stubFetch(impl: (url: string, init: RequestInit) => Promise<Response>) {
  const fetchMock = vi.fn(impl)
  vi.stubGlobal('fetch', fetchMock)
  return fetchMock
}

async function caught(promise: Promise<unknown>): Promise<ApiError> {
  const error = await promise.then(
    () => undefined,
    (e: unknown) => e,
  )
  expect(error).toBeInstanceOf(ApiError)
  return error as ApiError
}

afterEach(() => {
  vi.unstubAllGlobals()
})

describe('request', () => {
  it('sends JSON to /api on the same origin and returns the parsed answer', async () => {
    const fetchMock = stubFetch(async () => jsonResponse(201, { id: 7 }))

    const result = await request<{ id: number }>('POST', '/jobs', { body: { concern: 'knock when pulling away' } })

    expect(result).toEqual({ id: 7 })
    const [url, init] = fetchMock.mock.calls[0]!
    expect(url).toBe('/api/jobs')
    expect(init.method).toBe('POST')
    expect(init.credentials).toBe('same-origin')
    expect(init.body).toBe('{"concern":"knock when pulling away"}')
    expect(init.headers).toMatchObject({ Accept: 'application/json', 'Content-Type': 'application/json' })
  })

  it('sends no body and no Content-Type on a GET', async () => {
    const fetchMock = stubFetch(async () => jsonResponse(200, { status: 'ok' }))

    await request('GET', '/health')

    const [, init] = fetchMock.mock.calls[0]!
    expect(init.body).toBeUndefined()
    expect(init.headers).not.toHaveProperty('Content-Type')
  })

  it('resolves to undefined on 204 No Content', async () => {
    stubFetch(async () => new Response(null, { status: 204 }))

    await expect(request('DELETE', '/jobs/7')).resolves.toBeUndefined()
  })

  it("turns the server's error shape into an ApiError with status, code, message and issues", async () => {
    const issues = [{ path: ['body', 'concern'], message: 'Required', code: 'invalid_type' }]
    stubFetch(async () =>
      jsonResponse(422, { error: { code: 'validation_failed', message: 'Some of the details are not right.', issues } }),
    )

    const error = await caught(request('POST', '/jobs', { body: {} }))

    expect(error.status).toBe(422)
    expect(error.code).toBe('validation_failed')
    expect(error.message).toBe('Some of the details are not right.')
    expect(error.issues).toEqual(issues)
  })

  it('gives an empty issue list when the server sends none', async () => {
    stubFetch(async () => jsonResponse(503, { error: { code: 'not_ready', message: 'The database cannot be reached right now.' } }))

    const error = await caught(request('GET', '/ready'))

    expect(error).toMatchObject({ status: 503, code: 'not_ready', issues: [] })
  })

  it('reports a failed connection as network_error with status 0', async () => {
    stubFetch(async () => {
      throw new TypeError('Failed to fetch')
    })

    const error = await caught(request('GET', '/health'))

    expect(error.status).toBe(0)
    expect(error.code).toBe('network_error')
    expect(error.message).toMatch(/cannot be reached/)
  })

  it('gives up after the timeout and says so', async () => {
    stubFetch(
      (_url, init) =>
        new Promise((_resolve, reject) => {
          init.signal?.addEventListener('abort', () => reject(init.signal?.reason))
        }),
    )

    const error = await caught(request('GET', '/health', { timeoutMs: 20 }))

    expect(error).toMatchObject({ status: 0, code: 'network_error' })
    expect(error.message).toMatch(/too long/)
  })

  it("treats a proxy's non-JSON error page as network_error, keeping the status", async () => {
    stubFetch(async () => new Response('<h1>502 Bad Gateway</h1>', { status: 502, headers: { 'Content-Type': 'text/html' } }))

    const error = await caught(request('GET', '/health'))

    expect(error).toMatchObject({ status: 502, code: 'network_error' })
    expect(error.message).toMatch(/cannot be reached/)
  })

  it('does not pass an HTML page answered with 200 off as data', async () => {
    stubFetch(async () => new Response('<!doctype html><html></html>', { status: 200, headers: { 'Content-Type': 'text/html' } }))

    const error = await caught(request('GET', '/health'))

    expect(error).toMatchObject({ status: 200, code: 'network_error' })
    expect(error.message).toMatch(/could not understand/)
  })

  it('treats JSON that is not the error shape as network_error', async () => {
    stubFetch(async () => jsonResponse(500, { message: 'something else' }))

    const error = await caught(request('GET', '/health'))

    expect(error).toMatchObject({ status: 500, code: 'network_error' })
  })
})

describe('onUnauthorized', () => {
  it('calls the registered handler on 401 and still rejects', async () => {
    stubFetch(async () => jsonResponse(401, { error: { code: 'unauthorized', message: 'Please sign in' } }))
    const handler = vi.fn()
    const stop = onUnauthorized(handler)

    const error = await caught(request('GET', '/jobs'))
    stop()

    expect(handler).toHaveBeenCalledOnce()
    expect(handler).toHaveBeenCalledWith(error)
    expect(error).toMatchObject({ status: 401, code: 'unauthorized' })
  })

  it('does not call the handler for other errors, nor after it is removed', async () => {
    const handler = vi.fn()
    const stop = onUnauthorized(handler)
    stubFetch(async () => jsonResponse(403, { error: { code: 'forbidden', message: 'You are not allowed to do that' } }))
    await caught(request('GET', '/jobs'))

    stop()
    stubFetch(async () => jsonResponse(401, { error: { code: 'unauthorized', message: 'Please sign in' } }))
    await caught(request('GET', '/jobs'))

    expect(handler).not.toHaveBeenCalled()
  })
})
