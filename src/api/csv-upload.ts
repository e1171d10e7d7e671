import { API_BASE, ApiError, failedAnswer, unexpectedAnswer } from './http'

/** Thousands of rows over a slow workshop connection: minutes rather than an ordinary call's 20 seconds. */
const CSV_UPLOAD_TIMEOUT_MS = 5 * 60_000

function readJson(xhr: XMLHttpRequest): unknown {
  if (!xhr.getResponseHeader('Content-Type')?.includes('application/json')) return undefined
  try {
    return JSON.parse(xhr.responseText) as unknown
  } catch {
    return undefined
  }
}

/**
 * POSTs a CSV file's text as text/csv with XMLHttpRequest, because fetch cannot report upload
 * progress. Answers and failures read as in http.ts: the same ApiError, the same 401 handling.
 */
export function uploadCsv<T>(path: string, text: string, onProgress?: (fraction: number) => void): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    const xhr = new XMLHttpRequest()
    xhr.open('POST', `${API_BASE}${path}`)
    xhr.setRequestHeader('Accept', 'application/json')
    xhr.setRequestHeader('Content-Type', 'text/csv; charset=utf-8')
    xhr.timeout = CSV_UPLOAD_TIMEOUT_MS
    xhr.upload.addEventListener('progress', (event) => {
      if (event.lengthComputable && event.total > 0) onProgress?.(event.loaded / event.total)
    })
    xhr.addEventListener('load', () => {
      onProgress?.(1)
      const body = readJson(xhr)
      if (xhr.status >= 200 && xhr.status < 300) {
        if (body === undefined) reject(unexpectedAnswer(xhr.status))
        else resolve(body as T)
        return
      }
      reject(failedAnswer(xhr.status, body))
    })
    xhr.addEventListener('error', () => {
      reject(
        new ApiError(0, 'network_error', 'The file could not be sent: the server cannot be reached. Check the connection and try again.'),
      )
    })
    xhr.addEventListener('timeout', () => {
      reject(new ApiError(0, 'network_error', 'Sending the file took too long. Check the connection and try again.'))
    })
    xhr.send(text)
  })
}
