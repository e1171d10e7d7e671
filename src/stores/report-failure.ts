import { ApiError } from '@/api/http'
import { useNotificationsStore } from './notifications'

/**
 * Answers the screen that asked explains in place, next to the field or in the dialog: mistakes in
 * a form, conflicts such as "the only owner", too many tries. 401 is left to the sign-in redirect.
 */
const explainedInPlace = new Set([401, 409, 422, 429])

/** Anything but an ApiError is a bug in the app and must not pass for a server problem. */
export function asApiError(cause: unknown): ApiError {
  if (cause instanceof ApiError) return cause
  throw cause
}

/** For a store's `catch`: returns the ApiError to keep in `error` and queues its message if no screen shows it. */
export function reportFailure(cause: unknown): ApiError {
  const error = asApiError(cause)
  if (!explainedInPlace.has(error.status)) useNotificationsStore().push('error', error.message)
  return error
}
