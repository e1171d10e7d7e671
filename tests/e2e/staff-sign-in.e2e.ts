import { describe, expect, it } from 'vitest'
import { expectNoSeriousAxe, screenshot, useJourneyBrowser, visible } from './support/browser'
import { linkFrom, mailIdsTo, readLatestMail } from './support/mail'

const OWNER = 'owner@brackenfold4x4.test'

const browser = useJourneyBrowser()

describe('the owner signs in with a link from their e-mail', () => {
  it('asks for a link, follows it from the mail and lands on the staff home', async () => {
    const page = await browser.current.newDesktopPage()

    // Signed out, the app sends the owner to sign in and remembers where they were going.
    await page.goto('/')
    await page.waitForURL((url) => url.pathname === '/sign-in')
    expect(new URL(page.url()).searchParams.get('redirect')).toBe('/')
    await visible(page.getByRole('heading', { name: 'Sign in to your workshop', level: 1 }))
    await screenshot(page, 'staff-sign-in-1-form')
    await expectNoSeriousAxe(page, 'staff sign-in page')

    const before = await mailIdsTo(OWNER)
    await page.getByLabel('E-mail address').fill(OWNER)
    await page.getByRole('button', { name: 'Send me a sign-in link' }).click()
    await visible(page.getByRole('heading', { name: 'Check your e-mail', level: 1 }))
    expect(await page.getByText(OWNER, { exact: true }).isVisible()).toBe(true)
    await screenshot(page, 'staff-sign-in-2-check-your-email')
    await expectNoSeriousAxe(page, 'staff sign-in, link sent')

    const mail = await readLatestMail(OWNER, 'Sign in to Tickover', { excluding: before })
    expect(mail.subject).toBe('Sign in to Tickover — Brackenfold 4x4 Works')
    const link = linkFrom(mail, '/sign-in/link')
    expect(link.searchParams.get('token')).toMatch(/.{20,}/)

    await page.goto(link.href)
    await page.waitForURL((url) => url.pathname === '/')
    await visible(page.getByRole('heading', { name: 'Welcome to Tickover', level: 1 }))
    // The token is taken out of the address bar once used.
    expect(new URL(page.url()).searchParams.has('token')).toBe(false)

    // Signed in as the owner of the demo workshop: the owner's destinations are offered.
    const nav = page.getByRole('navigation', { name: 'Main' })
    await visible(nav.getByRole('link', { name: 'Team' }))
    await visible(nav.getByRole('link', { name: 'Activity log' }))
    await visible(page.getByRole('banner').getByText('Brackenfold 4x4 Works'))
    await visible(page.getByRole('main'))
    await screenshot(page, 'staff-sign-in-3-home')
    await expectNoSeriousAxe(page, 'staff home')

    // The link works once: opened again, it no longer signs anybody in.
    const second = await browser.current.newDesktopPage()
    await second.goto(link.href)
    await visible(second.getByRole('heading', { name: 'This link has run out', level: 1 }))
    await screenshot(second, 'staff-sign-in-4-link-used')
  })
})
