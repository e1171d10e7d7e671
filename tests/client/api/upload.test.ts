import { afterEach, describe, expect, it, vi } from 'vitest'
import { ApiError, onUnauthorized } from '@/api/http'
import { uploadForm } from '@/api/upload'

type Listener = (event?: { lengthComputable: boolean; loaded: number; total: number }) => void

/** Stands in for the browser's XMLHttpRequest; each test scripts what the "server" does. */
class FakeXhr {
  static last: FakeXhr | null = null
  method = ''
  url = ''
  status = 0
  responseText = ''
  timeout = 0
  headers: Record<string, string> = {}
  responseHeaders: Record<string, string> = {}
  sent: unknown = null
  listeners: Record<string, Listener[]> = {}
  upload = { listeners: [] as Listener[], addEventListener: (_type: string, fn: Listener) => this.upload.listeners.push(fn) }

  constructor() {
    FakeXhr.last = this
  }
  open(method: string, url: string) {
    this.method = method
    this.url = url
  }
  setRequestHeader(name: string, value: string) {
    this.headers[name] = value
  }
  getResponseHeader(name: string) {
    return this.responseHeaders[name] ?? null
  }
  addEventListener(type: string, fn: Listener) {
    ;(this.listeners[type] ??= []).push(fn)
  }
  send(body: unknown) {
    this.sent = body
  }
  progress(loaded: number, total: number) {
    for (const fn of this.upload.listeners) fn({ lengthComputable: true, loaded, total })
  }
  answer(status: number, body: unknown) {
    this.status = status
    this.responseHeaders['Content-Type'] = 'application/json; charset=utf-8'
    this.responseText = JSON.stringify(body)
    for (const fn of this.listeners.load ?? []) fn()
  }
  fail(type: 'error' | 'timeout') {
    for (const fn of this.listeners[type] ?? []) fn()
  }
}

function started<T>(options: Parameters<typeof uploadForm>[2] = {}) {
  vi.stubGlobal('XMLHttpRequest', FakeXhr)
  const form = new FormData()
  const promise = uploadForm<T>('/findings/f1/photos', form, options)
  const xhr = FakeXhr.last
  if (!xhr) throw new Error('no request was made')
  return { promise, xhr, form }
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

describe('uploadForm', () => {
  it('posts the form to /api, reports progress, and returns the parsed answer', async () => {
    const onProgress = vi.fn()
    const { promise, xhr, form } = started<{ items: unknown[] }>({ onProgress })

    expect(xhr.method).toBe('POST')
    expect(xhr.url).toBe('/api/findings/f1/photos')
    expect(xhr.headers).toEqual({ Accept: 'application/json' })
    expect(xhr.sent).toBe(form)
    xhr.progress(250, 1000)
    xhr.progress(1000, 1000)
    xhr.answer(201, { items: [{ id: 'p1' }] })

    await expect(promise).resolves.toEqual({ items: [{ id: 'p1' }] })
    expect(onProgress.mock.calls).toEqual([[0.25], [1]])
  })

  it('turns a refusal into the same ApiError as every other call (415 unsupported_image)', async () => {
    const { promise, xhr } = started()
    const message = 'That file is not a photo we can use. Send a JPEG, PNG or WebP picture.'
    xhr.answer(415, { error: { code: 'unsupported_image', message } })

    const error = await caught(promise)
    expect(error).toMatchObject({ status: 415, code: 'unsupported_image', message })
  })

  it('hands a 401 to the one unauthorized handler', async () => {
    const handler = vi.fn()
    const stop = onUnauthorized(handler)
    const { promise, xhr } = started()
    xhr.answer(401, { error: { code: 'unauthorized', message: 'Please sign in.' } })

    const error = await caught(promise)
    stop()
    expect(handler).toHaveBeenCalledWith(error)
  })

  it.each([
    ['error', /cannot be reached/],
    ['timeout', /took too long/],
  ] as const)('reports a connection %s as status 0 with a plain message', async (kind, message) => {
    const { promise, xhr } = started()
    xhr.fail(kind)

    const error = await caught(promise)
    expect(error.status).toBe(0)
    expect(error.code).toBe('network_error')
    expect(error.message).toMatch(message)
  })
})
