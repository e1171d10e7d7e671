import { z } from 'zod'

const port = z.coerce.number().int().min(1).max(65535)
const booleanish = z
  .enum(['true', 'false', '1', '0', 'yes', 'no'])
  .transform((v) => v === 'true' || v === '1' || v === 'yes')

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
  })
  .transform((env) => ({
    ...env,
    PUBLIC_BASE_URL: (env.PUBLIC_BASE_URL ?? `http://127.0.0.1:${env.PORT}`).replace(/\/$/, ''),
  }))

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
