import { createPaymentsFake } from './server'

/**
 * Starts the payments fake on 127.0.0.1 (see docker-free-dev/README.md). Environment:
 * PAYMENTS_FAKE_PORT (default 12111), PAYMENTS_FAKE_WEBHOOK_URL + PAYMENTS_FAKE_WEBHOOK_SECRET
 * (default endpoint for every key), PAYMENTS_FAKE_WEBHOOK_MAX_ATTEMPTS,
 * PAYMENTS_FAKE_WEBHOOK_BACKOFF_MS, PAYMENTS_FAKE_MERCHANT_NAME, PAYMENTS_FAKE_PUBLIC_URL.
 */

function fail(message: string): never {
  console.error(`payments fake: ${message}`)
  process.exit(1)
}

function integerEnv(name: string, fallback: number | undefined, min: number, max: number): number | undefined {
  const raw = process.env[name]
  if (raw === undefined || raw === '') return fallback
  const n = Number(raw)
  if (!Number.isInteger(n) || n < min || n > max) fail(`${name} must be a whole number from ${min} to ${max}, not "${raw}"`)
  return n
}

const env = (name: string) => (process.env[name] === '' ? undefined : process.env[name])

const port = integerEnv('PAYMENTS_FAKE_PORT', 12111, 0, 65535) ?? 12111
let fake
try {
  fake = createPaymentsFake({
    webhookUrl: env('PAYMENTS_FAKE_WEBHOOK_URL'),
    webhookSecret: env('PAYMENTS_FAKE_WEBHOOK_SECRET'),
    webhookMaxAttempts: integerEnv('PAYMENTS_FAKE_WEBHOOK_MAX_ATTEMPTS', undefined, 1, 20),
    webhookBackoffMs: integerEnv('PAYMENTS_FAKE_WEBHOOK_BACKOFF_MS', undefined, 0, 3_600_000),
    merchantName: env('PAYMENTS_FAKE_MERCHANT_NAME'),
    publicUrl: env('PAYMENTS_FAKE_PUBLIC_URL'),
    log: (line) => console.log(line),
  })
} catch (err) {
  fail(err instanceof Error ? err.message : String(err))
}

const running = await fake
  .listen(port)
  .catch((err: NodeJS.ErrnoException) =>
    fail(
      err.code === 'EADDRINUSE'
        ? `port ${port} on 127.0.0.1 is already in use; stop what uses it or choose another with PAYMENTS_FAKE_PORT=<port>`
        : err.message,
    ),
  )
console.log(`payments fake listening on ${running.url}`)

let stopping = false
for (const signal of ['SIGTERM', 'SIGINT'] as const) {
  process.once(signal, () => {
    if (stopping) return
    stopping = true
    void running.close().then(() => process.exit(0))
  })
}
