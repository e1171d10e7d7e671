/** Typed errors thrown by services; the error middleware turns them into the JSON error shape. */
export interface ErrorIssue {
  path: (string | number)[]
  message: string
  code?: string
}

export class AppError extends Error {
  constructor(
    public readonly status: number,
    public readonly code: string,
    message: string,
    public readonly issues?: ErrorIssue[],
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
  constructor(message: string, code = 'conflict') {
    super(409, code, message)
  }
}
