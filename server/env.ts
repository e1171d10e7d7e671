import { randomBytes } from 'node:crypto'
import { z } from 'zod'

const port = z.coerce.number().int().min(1).max(65535)
const booleanish = z.enum(['true', 'false', '1', '0', 'yes', 'no']).transform((v) => v === 'true' || v === '1' || v === 'yes')

/** What docker-free-dev/start.ts gives the payments fake; any sk_test_ key is an account of its own there. */
export const LOCAL_STRIPE_SECRET_KEY = 'sk_test_local_payments_fake'
export const LOCAL_STRIPE_WEBHOOK_SECRET = 'whsec_local_payments_fake'

/** What docker-free-dev/start.ts gives the SMS fake: well-formed, and no account at Twilio (createSmsClient refuses to send them there). */
export const LOCAL_TWILIO_ACCOUNT_SID = `AC${'0'.repeat(32)}`
export const LOCAL_TWILIO_AUTH_TOKEN = '0'.repeat(32)
/** Twilio's test sender that passes every check (Twilio docs, "Test Credentials"); the SMS fake honours it too. */
export const LOCAL_TWILIO_FROM = '+15005550006'

export const EnvSchema = z
  .object({
    NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
    HOST: z.string().default('127.0.0.1'),
    PORT: port.default(3000),
    DATABASE_URL: z.url({ protocol: /^postgres(ql)?$/, error: 'must be a postgres:// URL' }),
    DATABASE_POOL_MAX: z.coerce.number().int().min(1).max(100).default(10),
    /** Links in e-mails are built from this, never from the request's Host header. */
    PUBLIC_BASE_URL: z.url({ protocol: /^https?$/ }).optional(),
    LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
    /** Folder with the built client; empty to serve the API only. */
    CLIENT_DIST: z.string().default('dist'),
    SMTP_HOST: z.string().default('127.0.0.1'),
    SMTP_PORT: port.default(1025),
    SMTP_SECURE: booleanish.default(false),
    SMTP_USER: z.string().optional(),
    SMTP_PASS: z.string().optional(),
    MAIL_FROM: z.string().default('Tickover <no-reply@tickover.test>'),
    TRUST_PROXY: booleanish.default(false),
    /** Signs session cookies and sign-in links; every server process must share it. */
    AUTH_SECRET: z.string().min(32, 'must be at least 32 characters').optional(),
    /** Sessions end after this long without a request… */
    SESSION_IDLE_MINUTES: z.coerce
      .number()
      .int()
      .min(5)
      .max(24 * 60)
      .default(120),
    /** …and this long after sign-in, however busy. */
    SESSION_ABSOLUTE_HOURS: z.coerce
      .number()
      .int()
      .min(1)
      .max(24 * 7)
      .default(12),
    /** Secure cookies; defaults to on when PUBLIC_BASE_URL is https. */
    COOKIE_SECURE: booleanish.optional(),
    /** Extra origins allowed to send state-changing requests (the Vite dev server, say), comma-separated. */
    EXTRA_ORIGINS: z.string().default(''),
    /** Photos are stored here, outside anything the web server serves. */
    UPLOAD_DIR: z.string().default('.data/uploads'),
    /** Set to false only to exercise a workload without limits. */
    RATE_LIMITS: booleanish.default(true),
    /** Card payments. Outside production a key that only the local payments fake accepts is used when unset. */
    STRIPE_SECRET_KEY: z
      .string()
      .regex(/^sk_(test|live)_\w+$/, 'must be a Stripe secret key (sk_test_… or sk_live_…)')
      .optional(),
    /** Signs the provider's webhooks; outside production the local payments fake's secret is used when unset. */
    STRIPE_WEBHOOK_SECRET: z
      .string()
      .regex(/^whsec_\w+$/, 'must be a webhook signing secret (whsec_…)')
      .optional(),
    /** Another address for the Stripe API (the local payments fake); unset, the SDK talks to Stripe. */
    STRIPE_API_BASE: z.url({ protocol: /^https?$/ }).optional(),
    /** Set by the local scripts when they run the payments fake; used as STRIPE_API_BASE when that is unset. */
    PAYMENTS_FAKE_URL: z.url({ protocol: /^https?$/ }).optional(),
    /** Text messages. Outside production, credentials that only the local SMS fake accepts are used when unset. */
    TWILIO_ACCOUNT_SID: z
      .string()
      .regex(/^AC[0-9a-f]{32}$/, 'must be a Twilio account SID (AC and 32 hex digits)')
      .optional(),
    TWILIO_AUTH_TOKEN: z
      .string()
      .regex(/^[0-9a-f]{32}$/, 'must be a Twilio auth token (32 hex digits)')
      .optional(),
    /** The sender: a phone number in E.164 or a Messaging Service SID; outside production Twilio's test sender when unset. */
    TWILIO_FROM: z
      .string()
      .regex(/^(\+[1-9]\d{1,14}|MG[0-9a-f]{32})$/, 'must be a phone number in E.164 (+447700900123) or a Messaging Service SID (MG…)')
      .optional(),
    /** Another address for the Twilio API (the local SMS fake); unset, the SDK talks to Twilio. */
    TWILIO_API_BASE: z.url({ protocol: /^https?$/ }).optional(),
    /** Set by the local scripts when they run the SMS fake; used as TWILIO_API_BASE outside production when that is unset. */
    SMS_FAKE_URL: z.url({ protocol: /^https?$/ }).optional(),
  })
  .superRefine((env, ctx) => {
    if (env.NODE_ENV === 'production' && !env.AUTH_SECRET && env.PUBLIC_BASE_URL?.startsWith('https:')) {
      ctx.addIssue({ code: 'custom', path: ['AUTH_SECRET'], message: 'is required in production behind HTTPS' })
    }
    // A production server must never fall back to the local fake's well-known secrets.
    if (env.NODE_ENV === 'production' && !env.STRIPE_SECRET_KEY)
      ctx.addIssue({ code: 'custom', path: ['STRIPE_SECRET_KEY'], message: 'is required in production' })
    if (env.NODE_ENV === 'production' && !env.STRIPE_WEBHOOK_SECRET)
      ctx.addIssue({ code: 'custom', path: ['STRIPE_WEBHOOK_SECRET'], message: 'is required in production' })
    for (const field of ['TWILIO_ACCOUNT_SID', 'TWILIO_AUTH_TOKEN', 'TWILIO_FROM'] as const)
      if (env.NODE_ENV === 'production' && !env[field])
        ctx.addIssue({ code: 'custom', path: [field], message: 'is required in production' })
  })
  .transform((env) => {
    const publicBaseUrl = (env.PUBLIC_BASE_URL ?? `http://127.0.0.1:${env.PORT}`).replace(/\/$/, '')
    return {
      ...env,
      PUBLIC_BASE_URL: publicBaseUrl,
      // Without a configured secret (local use), each process makes its own: sessions then end at restart.
      AUTH_SECRET: env.AUTH_SECRET ?? randomBytes(32).toString('base64url'),
      STRIPE_SECRET_KEY: env.STRIPE_SECRET_KEY ?? LOCAL_STRIPE_SECRET_KEY,
      STRIPE_WEBHOOK_SECRET: env.STRIPE_WEBHOOK_SECRET ?? LOCAL_STRIPE_WEBHOOK_SECRET,
      STRIPE_API_BASE: env.STRIPE_API_BASE ?? env.PAYMENTS_FAKE_URL,
      TWILIO_ACCOUNT_SID: env.TWILIO_ACCOUNT_SID ?? LOCAL_TWILIO_ACCOUNT_SID,
      TWILIO_AUTH_TOKEN: env.TWILIO_AUTH_TOKEN ?? LOCAL_TWILIO_AUTH_TOKEN,
      TWILIO_FROM: env.TWILIO_FROM ?? LOCAL_TWILIO_FROM,
      // A production server texts through Twilio unless told otherwise, whatever fake a local script left in the environment.
      TWILIO_API_BASE: env.TWILIO_API_BASE ?? (env.NODE_ENV === 'production' ? undefined : env.SMS_FAKE_URL),
      COOKIE_SECURE: env.COOKIE_SECURE ?? publicBaseUrl.startsWith('https:'),
      ALLOWED_ORIGINS: [
        new URL(publicBaseUrl).origin,
        ...env.EXTRA_ORIGINS.split(',')
          .map((o) => o.trim())
          .filter(Boolean),
      ],
    }
  })

export type Env = z.infer<typeof EnvSchema>

export class EnvError extends Error {
  constructor(public readonly fields: { field: string; message: string }[]) {
    super(`Invalid environment:\n${fields.map((f) => `  ${f.field}: ${f.message}`).join('\n')}`)
  }
}

/** Parses the environment once at start-up; the error names every bad field. */
export function loadEnv(source: NodeJS.ProcessEnv = process.env): Env {
  const cleaned = Object.fromEntries(Object.entries(source).filter(([, v]) => v !== ''))
  const parsed = EnvSchema.safeParse(cleaned)
  if (!parsed.success) {
    throw new EnvError(parsed.error.issues.map((i) => ({ field: i.path.join('.') || '(root)', message: i.message })))
  }
  return parsed.data
}
