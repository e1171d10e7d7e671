import { API_BASE, ApiError, failedAnswer, unexpectedAnswer } from './http'

/**
 * A few phone photos over a workshop's slow connection take minutes, not the 20 seconds an ordinary
 * call is given; the progress bar shows it is still moving.
 */
const DEFAULT_UPLOAD_TIMEOUT_MS = 10 * 60_000

export interface UploadOptions {
  /** Called with the share of the request body sent so far, from 0 to 1. */
  onProgress?: (fraction: number) => void
  timeoutMs?: number
}

function readJson(xhr: XMLHttpRequest): unknown {
  if (!xhr.getResponseHeader('Content-Type')?.includes('application/json')) return undefined
  try {
    return JSON.parse(xhr.responseText) as unknown
  } catch {
    return undefined
  }
}

/**
 * Sends multipart form data with XMLHttpRequest, because fetch cannot report upload progress. Answers
 * and failures are read exactly as `request` in http.ts reads them: the same ApiError, the same 401 handling.
 */
export function uploadForm<T>(path: string, form: FormData, options: UploadOptions = {}): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    const xhr = new XMLHttpRequest()
    xhr.open('POST', `${API_BASE}${path}`)
    xhr.setRequestHeader('Accept', 'application/json')
    xhr.timeout = options.timeoutMs ?? DEFAULT_UPLOAD_TIMEOUT_MS
    xhr.upload.addEventListener('progress', (event) => {
      if (event.lengthComputable && event.total > 0) options.onProgress?.(event.loaded / event.total)
    })
    xhr.addEventListener('load', () => {
      const body = readJson(xhr)
      if (xhr.status >= 200 && xhr.status < 300) {
        if (xhr.status === 204) resolve(undefined as T)
        else if (body === undefined) reject(unexpectedAnswer(xhr.status))
        else resolve(body as T)
        return
      }
      reject(failedAnswer(xhr.status, body))
    })
    xhr.addEventListener('error', () => {
      reject(
        new ApiError(0, 'network_error', 'The photos could not be sent: the server cannot be reached. Check the connection and try again.'),
      )
    })
    xhr.addEventListener('timeout', () => {
      reject(
        new ApiError(
          0,
          'network_error',
          'Sending the photos took too long. Check the connection and try again, perhaps with fewer photos.',
        ),
      )
    })
    xhr.addEventListener('abort', () => {
      reject(new ApiError(0, 'upload_stopped', 'The upload was stopped before it finished.'))
    })
    xhr.send(form)
  })
}
