import { describe, expect, inject, it } from 'vitest'
import { runAxe, useJourneyBrowser } from './support/browser'
import { type CaughtMail, linkFrom } from './support/mail'

// The journeys lean on these helpers to fail; here they are shown failing on purpose.

const browser = useJourneyBrowser()

describe('the journey helpers', () => {
  it('axe reports an image without a text alternative and a button without a name as blocking', async () => {
    const page = await browser.current.newDesktopPage()
    await page.setContent(
      '<!doctype html><html lang="en"><head><title>Bad page</title></head><body><main><h1>Bad page</h1>' +
        '<img src="data:image/gif;base64,R0lGODlhAQABAAAAACw="><button type="button"></button></main></body></html>',
    )
    const report = await runAxe(page, 'helper check, bad page')
    const text = report.blocking.join('\n')
    expect(text).toContain('image-alt')
    expect(text).toContain('button-name')
    expect(report.byImpact.critical).toBeGreaterThanOrEqual(2)
  })

  it('axe passes a plain page with nothing wrong', async () => {
    const page = await browser.current.newDesktopPage()
    await page.setContent(
      '<!doctype html><html lang="en"><head><title>Good page</title></head><body><main><h1>Good page</h1><p>Nothing to see.</p></main></body></html>',
    )
    const report = await runAxe(page, 'helper check, good page')
    expect(report.blocking).toEqual([])
  })

  it('picks the link to the app under test out of an e-mail, not a link elsewhere', () => {
    const { baseURL } = inject('e2e')
    const mail: CaughtMail = {
      id: 'x',
      subject: 'Sign in',
      html: '',
      time: new Date().toISOString(),
      to: [{ address: 'someone@example.test' }],
      text: [
        'Our terms: https://example.test/terms',
        'Another server: http://127.0.0.1:1/sign-in/link?token=elsewhere',
        `Your link: ${baseURL}/sign-in/link?token=abc123`,
        `Your estimate: ${baseURL}/portal/estimates/e1?key=k`,
      ].join('\n'),
    }
    expect(linkFrom(mail).href).toBe(`${baseURL}/sign-in/link?token=abc123`)
    expect(linkFrom(mail, '/portal/').href).toBe(`${baseURL}/portal/estimates/e1?key=k`)
    expect(() => linkFrom(mail, '/nowhere')).toThrow(/No link to/)
  })
})
