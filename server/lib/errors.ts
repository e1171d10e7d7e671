/** Typed errors thrown by services; the error middleware turns them into the JSON error shape. */
export interface ErrorIssue {
  path: (string | number)[]
  message: string
  code?: string
}

/**
 * `details` carries what a page needs to offer the next step (a fresh link, the newer version), beside
 * the code and message; the error middleware sends it as `error.details`.
 */
export class AppError extends Error {
  constructor(
    public readonly status: number,
    public readonly code: string,
    message: string,
    public readonly issues?: ErrorIssue[],
    public readonly details?: Record<string, unknown>,
  ) {
    super(message)
  }
}

export class ValidationError extends AppError {
  constructor(message: string, issues: ErrorIssue[], code = 'validation_failed') {
    super(422, code, message, issues)
  }
}

export class NotFoundError extends AppError {
  constructor(message = 'Not found', code = 'not_found') {
    super(404, code, message)
  }
}

export class ForbiddenError extends AppError {
  constructor(message = 'You are not allowed to do that', code = 'forbidden') {
    super(403, code, message)
  }
}

export class UnauthorizedError extends AppError {
  constructor(message = 'Please sign in', code = 'unauthorized') {
    super(401, code, message)
  }
}

export class ConflictError extends AppError {
  constructor(message: string, code = 'conflict', details?: Record<string, unknown>) {
    super(409, code, message, undefined, details)
  }
}

/** Something that existed and is gone for good: an expired, replaced or withdrawn estimate or link. */
export class GoneError extends AppError {
  constructor(message: string, code = 'gone', details?: Record<string, unknown>) {
    super(410, code, message, undefined, details)
  }
}

/** A request that cannot be understood or names something we never issued (an unknown link). */
export class BadRequestError extends AppError {
  constructor(message: string, code = 'bad_request', details?: Record<string, unknown>) {
    super(400, code, message, undefined, details)
  }
}

/** Another service we depend on (the card payment provider) refused or could not be reached. */
export class UpstreamError extends AppError {
  constructor(message: string, code = 'upstream_error') {
    super(502, code, message)
  }
}

/** A file of a kind we do not take (an upload that is not a photo). */
export class UnsupportedMediaError extends AppError {
  constructor(message: string, code = 'unsupported_media') {
    super(415, code, message)
  }
}
