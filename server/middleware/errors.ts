import type { ErrorRequestHandler, RequestHandler } from 'express'
import { AppError, NotFoundError } from '../lib/errors'

export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new NotFoundError(`No API route for ${req.method} ${req.path}`, 'route_not_found'))
}

interface HttpLikeError {
  status?: number
  statusCode?: number
  type?: string
  expose?: boolean
}

/** The one place errors become responses: { error: { code, message, issues? } }; never a stack trace or SQL. */
export const errorHandler: ErrorRequestHandler = (err: unknown, req, res, _next) => {
  if (res.headersSent) {
    req.log?.error({ err }, 'error after response started')
    res.end()
    return
  }
  if (err instanceof AppError) {
    res.status(err.status).json({
      error: {
        code: err.code,
        message: err.message,
        ...(err.issues ? { issues: err.issues } : {}),
        ...(err.details ? { details: err.details } : {}),
      },
    })
    return
  }
  if (err instanceof Error && err.name === 'MulterError') {
    const code = (err as Error & { code?: string }).code
    if (code === 'LIMIT_FILE_SIZE') {
      res.status(413).json({
        error: { code: 'photo_too_large', message: 'That photo is over 15 MB. Take it at a lower resolution or send a smaller copy.' },
      })
    } else if (code === 'LIMIT_FILE_COUNT' || code === 'LIMIT_UNEXPECTED_FILE') {
      res.status(413).json({ error: { code: 'too_many_photos', message: 'Send at most 10 photos at a time, in the "photos" field.' } })
    } else {
      res.status(400).json({ error: { code: 'bad_upload', message: 'The upload could not be read. Please try again.' } })
    }
    return
  }
  const httpErr = (err ?? {}) as HttpLikeError
  const status = httpErr.status ?? httpErr.statusCode
  if (httpErr.type === 'entity.parse.failed') {
    res.status(400).json({ error: { code: 'invalid_json', message: 'The request body is not valid JSON.' } })
    return
  }
  if (httpErr.type === 'entity.too.large') {
    res.status(413).json({ error: { code: 'payload_too_large', message: 'The request body is too large.' } })
    return
  }
  if (status && status >= 400 && status < 500 && httpErr.expose) {
    res.status(status).json({ error: { code: 'bad_request', message: 'The request could not be understood.' } })
    return
  }
  req.log?.error({ err }, 'unhandled error')
  res.status(500).json({ error: { code: 'internal_error', message: 'Something went wrong on our side. Please try again.' } })
}
