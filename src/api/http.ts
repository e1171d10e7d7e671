export const API_BASE = '/api'
const DEFAULT_TIMEOUT_MS = 20_000

/** Mirrors ErrorIssue in server/lib/errors.ts. */
export interface ApiIssue {
  path: (string | number)[]
  message: string
  code?: string
}

/** The server's error body, `{ error: { code, message, issues?, details? } }`; see server/middleware/errors.ts. */
interface ErrorBody {
  error: { code: string; message: string; issues?: ApiIssue[]; details?: unknown }
}

// Checked by hand rather than with zod: this module is on every page's path, and zod would
// add about 25 kB gzipped to what a customer's phone downloads first.
function isErrorBody(body: unknown): body is ErrorBody {
  if (typeof body !== 'object' || body === null || !('error' in body)) return false
  const error: unknown = body.error
  return (
    typeof error === 'object' &&
    error !== null &&
    'code' in error &&
    typeof error.code === 'string' &&
    'message' in error &&
    typeof error.message === 'string' &&
    (!('issues' in error) || error.issues === undefined || Array.isArray(error.issues))
  )
}

export class ApiError extends Error {
  override readonly name = 'ApiError'

  constructor(
    /** 0 when no HTTP answer arrived at all. */
    readonly status: number,
    readonly code: string,
    message: string,
    readonly issues: ApiIssue[] = [],
    /** What some refusals add so the page can offer the next step (a fresh link, the latest version); its shape depends on `code`. */
    readonly details: unknown = undefined,
  ) {
    super(message)
  }
}

type UnauthorizedHandler = (error: ApiError) => void
let unauthorizedHandler: UnauthorizedHandler | undefined

/**
 * Registers the one place that reacts to 401 (the auth store will send the user to sign in).
 * Returns a function that removes the handler again.
 */
export function onUnauthorized(handler: UnauthorizedHandler): () => void {
  unauthorizedHandler = handler
  return () => {
    if (unauthorizedHandler === handler) unauthorizedHandler = undefined
  }
}

export interface RequestOptions {
  body?: unknown
  /** Workshop connections are slow: callers sending photos may need longer than the default. */
  timeoutMs?: number
}

/**
 * Every API call goes through here, so headers (CSRF token later), error parsing and the 401
 * handling live in one place.
 */
export async function request<T>(method: string, path: string, options: RequestOptions = {}): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json' }
  if (options.body !== undefined) headers['Content-Type'] = 'application/json'

  let response: Response
  try {
    response = await fetch(`${API_BASE}${path}`, {
      method,
      headers,
      body: options.body === undefined ? undefined : JSON.stringify(options.body),
      credentials: 'same-origin',
      signal: AbortSignal.timeout(options.timeoutMs ?? DEFAULT_TIMEOUT_MS),
    })
  } catch (cause) {
    const timedOut = cause instanceof DOMException && cause.name === 'TimeoutError'
    throw new ApiError(
      0,
      'network_error',
      timedOut
        ? 'The server took too long to answer. Check the connection and try again.'
        : 'The server cannot be reached. Check the connection and try again.',
    )
  }

  const body = await readJson(response)
  if (response.ok) {
    if (response.status === 204) return undefined as T
    if (body === undefined) throw unexpectedAnswer(response.status)
    return body as T
  }

  throw failedAnswer(response.status, body)
}

/**
 * The ApiError for a non-2xx answer whose body has been read (undefined when it was not JSON);
 * a 401 also reaches the one unauthorized handler. Shared with the upload helper in upload.ts.
 */
export function failedAnswer(status: number, body: unknown): ApiError {
  const error = isErrorBody(body)
    ? new ApiError(status, body.error.code, body.error.message, body.error.issues, body.error.details)
    : unexpectedAnswer(status)
  if (status === 401) unauthorizedHandler?.(error)
  return error
}

/** A proxy's error page or the SPA's index.html is not an API answer; treat it as no answer. */
async function readJson(response: Response): Promise<unknown> {
  if (!response.headers.get('Content-Type')?.includes('application/json')) return undefined
  try {
    return await response.json()
  } catch {
    return undefined
  }
}

export function unexpectedAnswer(status: number): ApiError {
  // A 5xx page that is not ours comes from a proxy or gateway standing in for a server that is down.
  const message =
    status >= 500
      ? `The server cannot be reached right now (HTTP ${status}). Please try again in a moment.`
      : `The app could not understand the server's answer (HTTP ${status}). Please try again in a moment.`
  return new ApiError(status, 'network_error', message)
}
