import { createSmsFake } from './server'

/**
 * Starts the SMS fake on 127.0.0.1 (see docker-free-dev/README.md). Environment: SMS_FAKE_PORT
 * (default 12112), SMS_FAKE_STEP_MS, SMS_FAKE_CALLBACK_MAX_ATTEMPTS, SMS_FAKE_CALLBACK_BACKOFF_MS.
 */

function fail(message: string): never {
  console.error(`SMS fake: ${message}`)
  process.exit(1)
}

function integerEnv(name: string, min: number, max: number): number | undefined {
  const raw = process.env[name]
  if (raw === undefined || raw === '') return undefined
  const n = Number(raw)
  if (!Number.isInteger(n) || n < min || n > max) fail(`${name} must be a whole number from ${min} to ${max}, not "${raw}"`)
  return n
}

const port = integerEnv('SMS_FAKE_PORT', 0, 65535) ?? 12112
const fake = createSmsFake({
  stepMs: integerEnv('SMS_FAKE_STEP_MS', 0, 600_000),
  callbackMaxAttempts: integerEnv('SMS_FAKE_CALLBACK_MAX_ATTEMPTS', 1, 20),
  callbackBackoffMs: integerEnv('SMS_FAKE_CALLBACK_BACKOFF_MS', 0, 3_600_000),
  log: (line) => console.log(line),
})

const running = await fake
  .listen(port)
  .catch((err: NodeJS.ErrnoException) =>
    fail(
      err.code === 'EADDRINUSE'
        ? `port ${port} on 127.0.0.1 is already in use; stop what uses it or choose another with SMS_FAKE_PORT=<port>`
        : err.message,
    ),
  )
console.log(`SMS fake listening on ${running.url}`)

let stopping = false
for (const signal of ['SIGTERM', 'SIGINT'] as const) {
  process.once(signal, () => {
    if (stopping) return
    stopping = true
    void running.close().then(() => process.exit(0))
  })
}
