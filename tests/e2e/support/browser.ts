import fs from 'node:fs'
import path from 'node:path'
import AxeBuilder from '@axe-core/playwright'
import type { AxeResults, Result } from 'axe-core'
import { type Browser, type BrowserContext, type BrowserContextOptions, type Locator, type Page, chromium } from 'playwright-core'
import { afterAll, beforeAll, beforeEach, expect, inject } from 'vitest'
import { CHROMIUM_PATH } from './chromium'
import { resultsDir } from './context'
import { linkFrom, mailIdsTo, readLatestMail } from './mail'

/** Long enough for a cold page on two shared cores, short enough that a missing element fails the journey soon. */
const ACTION_TIMEOUT_MS = 15_000

const CHROMIUM_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
]

export interface E2eBrowser {
  browser: Browser
  /** A phone the size of a common 6.1" handset, held upright, touch only. */
  newPhonePage(): Promise<Page>
  newDesktopPage(): Promise<Page>
  close(): Promise<void>
}

/**
 * Debian's Chromium, headless. playwright-core's launch() gives the browser a fresh profile folder
 * of its own (made with mkdtemp, removed on close); each page below gets a new context, so no cookie
 * or storage carries over from one person to the next.
 */
export async function launchBrowser(): Promise<E2eBrowser> {
  const browser = await chromium.launch({ executablePath: CHROMIUM_PATH, headless: true, args: CHROMIUM_ARGS })
  const contexts: BrowserContext[] = []
  const open = async (options: BrowserContextOptions) => {
    const context = await browser.newContext({ baseURL: inject('e2e').baseURL, locale: 'en-GB', timezoneId: 'Europe/London', ...options })
    context.setDefaultTimeout(ACTION_TIMEOUT_MS)
    contexts.push(context)
    return context.newPage()
  }
  return {
    browser,
    newPhonePage: () => open({ viewport: { width: 390, height: 844 }, deviceScaleFactor: 2, isMobile: true, hasTouch: true }),
    newDesktopPage: () => open({ viewport: { width: 1366, height: 900 } }),
    async close() {
      await Promise.all(contexts.map((c) => c.close().catch(() => undefined)))
      await browser.close()
    },
  }
}

/**
 * One browser for a journey file: launched before its tests, closed after them. When a test fails,
 * every page still open is photographed as test-results/screens/FAILED-<test>-<n>.png first.
 */
export function useJourneyBrowser(): { readonly current: E2eBrowser } {
  let e2e: E2eBrowser | undefined
  beforeAll(async () => {
    e2e = await launchBrowser()
  })
  beforeEach(({ task, onTestFailed }) => {
    onTestFailed(async () => {
      const pages = e2e?.browser.contexts().flatMap((c) => c.pages()) ?? []
      const name = task.name.replace(/[^\w-]+/g, '-').slice(0, 60)
      for (const [i, page] of pages.entries()) {
        await screenshot(page, `FAILED-${name}-${i + 1}`).catch(() => undefined)
      }
    })
  })
  afterAll(async () => {
    await e2e?.close()
  })
  return {
    get current() {
      if (!e2e) throw new Error('The browser is started in beforeAll; use it inside a test')
      return e2e
    },
  }
}

/** Waits for the element to be on screen; the journeys' stand-in for a retrying visibility assertion. */
export async function visible(locator: Locator, timeout = ACTION_TIMEOUT_MS): Promise<Locator> {
  await locator.waitFor({ state: 'visible', timeout })
  return locator
}

/**
 * A PNG in test-results/screens/<name>.png of what the person sees: the viewport, scrolled so that
 * `at` (when given) is in the middle of it. `fullPage` stitches the whole page instead, for short
 * pages only: the fixed bars are then drawn where the page happened to be scrolled.
 */
export async function screenshot(page: Page, name: string, opts: { at?: Locator; fullPage?: boolean } = {}): Promise<string> {
  const file = path.join(resultsDir, 'screens', `${name}.png`)
  fs.mkdirSync(path.dirname(file), { recursive: true })
  if (opts.at) await opts.at.evaluate((el) => el.scrollIntoView({ block: 'center', behavior: 'instant' }))
  // Fonts and images finish loading before the picture, so it shows what a person would see.
  await page.evaluate(() => document.fonts.ready.then(() => undefined))
  await page.screenshot({ path: file, fullPage: opts.fullPage ?? false, animations: 'disabled', caret: 'hide' })
  return file
}

export const AXE_TAGS = ['wcag2a', 'wcag2aa', 'wcag21aa', 'wcag22aa']
const BLOCKING = new Set(['serious', 'critical'])

function describeViolation(v: Result): string {
  const targets = v.nodes
    .slice(0, 5)
    .map((n) => `      at ${n.target.join(' ')}${n.failureSummary ? `\n        ${n.failureSummary.replace(/\n\s*/g, '; ')}` : ''}`)
  const more = v.nodes.length > 5 ? [`      …and ${v.nodes.length - 5} more`] : []
  return [`  [${v.impact}] ${v.id}: ${v.help} (${v.helpUrl})`, ...targets, ...more].join('\n')
}

export interface AxeReport {
  label: string
  url: string
  /** Elements affected, by the impact axe gives the rule. */
  byImpact: Record<'critical' | 'serious' | 'moderate' | 'minor', number>
  /** The serious and critical violations, one readable block each (rule, help, where, why); empty when none. */
  blocking: string[]
  results: AxeResults
}

/**
 * Runs axe-core (WCAG 2.0–2.2 A and AA rules) on the page as it is now. Every finding, blocking or
 * not, is written to test-results/axe/<label>.json and counted on the console.
 */
export async function runAxe(page: Page, label: string): Promise<AxeReport> {
  const results = await new AxeBuilder({ page }).withTags(AXE_TAGS).analyze()
  const byImpact = { critical: 0, serious: 0, moderate: 0, minor: 0 }
  for (const v of results.violations) if (v.impact) byImpact[v.impact] += v.nodes.length
  const file = path.join(resultsDir, 'axe', `${label.replace(/[^\w-]+/g, '-')}.json`)
  fs.mkdirSync(path.dirname(file), { recursive: true })
  fs.writeFileSync(
    file,
    JSON.stringify(
      { label, url: results.url, byImpact, violations: results.violations, incomplete: results.incomplete.map((i) => i.id) },
      null,
      2,
    ),
  )
  const ids = results.violations.map((v) => `${v.id} (${v.impact})`).join(', ')
  process.stdout.write(
    `[axe] ${label}: ${byImpact.critical} critical, ${byImpact.serious} serious, ${byImpact.moderate} moderate, ${byImpact.minor} minor${ids ? ` — ${ids}` : ''}\n`,
  )
  const blocking = results.violations.filter((v) => v.impact && BLOCKING.has(v.impact)).map(describeViolation)
  return { label, url: results.url, byImpact, blocking, results }
}

/**
 * Fails the journey when axe finds anything serious or critical, with the list of what and where.
 * The failure is recorded softly: the journey carries on, so one accessibility problem does not hide
 * a broken step further on, and the test still fails at its end.
 */
export async function expectNoSeriousAxe(page: Page, label: string): Promise<AxeReport> {
  const report = await runAxe(page, label)
  expect.soft(report.blocking.join('\n'), `axe: serious or critical accessibility problems on “${label}” (${report.url})`).toBe('')
  return report
}

/**
 * Signs in the way a person does: the sign-in page, the link from the e-mail in the mail catcher,
 * then following it. Resolves once the app has left the sign-in pages.
 */
export async function signInAs(page: Page, email: string, audience: 'staff' | 'customer' = 'staff'): Promise<void> {
  const signInPath = audience === 'staff' ? '/sign-in' : '/portal/sign-in'
  const before = await mailIdsTo(email)
  await page.goto(signInPath)
  await page.getByLabel('E-mail address').fill(email)
  await page.getByRole('button', { name: 'Send me a sign-in link' }).click()
  await visible(page.getByRole('heading', { name: 'Check your e-mail' }))
  const mail = await readLatestMail(email, audience === 'staff' ? 'Sign in to Tickover' : 'Your link to', { excluding: before })
  const link = linkFrom(mail, `${signInPath}/link`)
  await page.goto(link.href)
  await page.waitForURL((url) => !url.pathname.startsWith(signInPath))
}
