import path from 'node:path'

/** Screenshots, axe reports and the app's output of the last run; git-ignored. */
export const resultsDir = path.resolve(import.meta.dirname, '..', '..', '..', 'test-results')

/** What the e2e global setup hands every journey (vitest provide/inject). */
export interface E2eContext {
  /** The built app served by the real server, e.g. http://127.0.0.1:41234 — also its PUBLIC_BASE_URL. */
  baseURL: string
  /** The mail catcher's web and API address; the app's SMTP goes there. */
  maildevURL: string
  /** The payments fake; its webhooks go to this app's /api/payments/webhook. */
  paymentsURL: string
  /** The fake's secret key the app uses: the fake keeps each key's data apart, and /_fake routes need it. */
  paymentsKey: string
}

declare module 'vitest' {
  export interface ProvidedContext {
    e2e: E2eContext
  }
}
