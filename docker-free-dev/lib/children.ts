import { type ChildProcess, spawn } from 'node:child_process'
import path from 'node:path'

const root = path.resolve(import.meta.dirname, '..', '..')
export const projectRoot = root
export const bin = (name: string) => path.join(root, 'node_modules', '.bin', name)

export interface Child {
  name: string
  process: ChildProcess
  stop(): Promise<void>
}

/** Starts a long-running program whose output is prefixed with its name; stop() sends SIGTERM, then SIGKILL after a grace period. */
export function startChild(name: string, command: string, args: string[], env: NodeJS.ProcessEnv = {}, quiet = false): Child {
  const child = spawn(command, args, {
    cwd: root,
    env: { ...process.env, ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  const prefix = (chunk: Buffer) =>
    chunk
      .toString()
      .split('\n')
      .filter((l) => l.trim())
      .map((l) => `[${name}] ${l}\n`)
      .join('')
  if (!quiet) {
    child.stdout?.on('data', (c: Buffer) => process.stdout.write(prefix(c)))
  }
  child.stderr?.on('data', (c: Buffer) => process.stderr.write(prefix(c)))
  const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()))
  return {
    name,
    process: child,
    async stop() {
      if (child.exitCode !== null || child.signalCode !== null) return
      child.kill('SIGTERM')
      const timer = setTimeout(() => child.kill('SIGKILL'), 5000)
      await exited
      clearTimeout(timer)
    },
  }
}

export function startMaildev(smtpPort: number, webPort: number, quiet = false): Child {
  return startChild(
    'maildev',
    bin('maildev'),
    ['--smtp', String(smtpPort), '--ip', '127.0.0.1', '--web', String(webPort), '--web-ip', '127.0.0.1', '--silent'],
    {},
    quiet,
  )
}

export interface PaymentsFakeOptions {
  port: number
  webhookUrl?: string
  webhookSecret?: string
  quiet?: boolean
}

/** The local stand-in for Stripe's API (see docker-free-dev/README.md). */
export function startPaymentsFake(opts: PaymentsFakeOptions): Child {
  return startChild(
    'payments',
    bin('tsx'),
    [path.join(root, 'docker-free-dev', 'payments-fake', 'main.ts')],
    {
      PAYMENTS_FAKE_PORT: String(opts.port),
      ...(opts.webhookUrl ? { PAYMENTS_FAKE_WEBHOOK_URL: opts.webhookUrl } : {}),
      ...(opts.webhookSecret ? { PAYMENTS_FAKE_WEBHOOK_SECRET: opts.webhookSecret } : {}),
    },
    opts.quiet,
  )
}

export interface SmsFakeOptions {
  port: number
  /** Time between a message's status changes; the fake's default suits a person watching its page. */
  stepMs?: number
  callbackBackoffMs?: number
  quiet?: boolean
}

/** The local stand-in for Twilio's Messages API (see docker-free-dev/README.md). */
export function startSmsFake(opts: SmsFakeOptions): Child {
  return startChild(
    'sms',
    bin('tsx'),
    [path.join(root, 'docker-free-dev', 'sms-fake', 'main.ts')],
    {
      SMS_FAKE_PORT: String(opts.port),
      ...(opts.stepMs !== undefined ? { SMS_FAKE_STEP_MS: String(opts.stepMs) } : {}),
      ...(opts.callbackBackoffMs !== undefined ? { SMS_FAKE_CALLBACK_BACKOFF_MS: String(opts.callbackBackoffMs) } : {}),
    },
    opts.quiet,
  )
}
