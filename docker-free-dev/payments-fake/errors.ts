import type Stripe from 'stripe'

/**
 * An answer in Stripe's error shape ({ error: { type, code, message, param } }, see
 * https://docs.stripe.com/api/errors). `stage` decides whether an idempotency key keeps the
 * answer: Stripe saves a result only once the endpoint began executing, so parameter
 * validation failures are not replayed (https://docs.stripe.com/api/idempotent_requests).
 */
export class FakeStripeError extends Error {
  constructor(
    readonly status: number,
    readonly raw: Stripe.StripeRawError,
    readonly stage: 'validation' | 'execution' = 'execution',
  ) {
    super(raw.message)
  }

  toBody(): { error: Stripe.StripeRawError } {
    return { error: this.raw }
  }
}

const docUrl = (code: string) => `https://stripe.com/docs/error-codes/${code.replaceAll('_', '-')}`

/** Wording of the messages below is from memory of Stripe's API answers; the codes are on https://docs.stripe.com/error-codes. */
export function parameterMissing(param: string): FakeStripeError {
  return new FakeStripeError(
    400,
    {
      type: 'invalid_request_error',
      code: 'parameter_missing',
      doc_url: docUrl('parameter_missing'),
      message: `Missing required param: ${param}.`,
      param,
    },
    'validation',
  )
}

export function parameterUnknown(param: string): FakeStripeError {
  return new FakeStripeError(
    400,
    {
      type: 'invalid_request_error',
      code: 'parameter_unknown',
      doc_url: docUrl('parameter_unknown'),
      message: `Received unknown parameter: ${param} (the payments fake implements only the parameters listed in docker-free-dev/README.md)`,
      param,
    },
    'validation',
  )
}

export function parameterInvalid(param: string, message: string, code?: string): FakeStripeError {
  return new FakeStripeError(
    400,
    { type: 'invalid_request_error', ...(code ? { code, doc_url: docUrl(code) } : {}), message, param },
    'validation',
  )
}

export function parameterEmpty(param: string): FakeStripeError {
  return parameterInvalid(
    param,
    `You passed an empty string for '${param}'. We assume empty values are an attempt to unset a parameter; however '${param}' cannot be unset. You should remove '${param}' from your request or supply a non-empty value.`,
    'parameter_invalid_empty',
  )
}

/** A well-formed request that the current state refuses (Stripe answers 400 invalid_request_error). */
export function invalidRequest(message: string, options: { param?: string; code?: string } = {}): FakeStripeError {
  return new FakeStripeError(400, {
    type: 'invalid_request_error',
    message,
    ...(options.param ? { param: options.param } : {}),
    ...(options.code ? { code: options.code, doc_url: docUrl(options.code) } : {}),
  })
}

export function resourceMissing(objectName: string, id: string, param: string): FakeStripeError {
  return new FakeStripeError(404, {
    type: 'invalid_request_error',
    code: 'resource_missing',
    doc_url: docUrl('resource_missing'),
    message: `No such ${objectName}: '${id}'`,
    param,
  })
}

export function unrecognizedUrl(method: string, path: string): FakeStripeError {
  return new FakeStripeError(
    404,
    {
      type: 'invalid_request_error',
      message: `Unrecognized request URL (${method}: ${path}). Please see https://stripe.com/docs or we can help at https://support.stripe.com/. (The payments fake implements only the endpoints listed in docker-free-dev/README.md.)`,
    },
    'validation',
  )
}

export function authenticationError(message: string): FakeStripeError {
  return new FakeStripeError(401, { type: 'invalid_request_error', message }, 'validation')
}

export function idempotencyError(message: string): FakeStripeError {
  return new FakeStripeError(400, { type: 'idempotency_error', message }, 'validation')
}
