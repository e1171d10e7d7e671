import { afterEach, describe, expect, it } from 'vitest'
import type { MessageView } from '../../docker-free-dev/sms-fake/inspect'
import { createSmsFake, type SmsFakeOptions } from '../../docker-free-dev/sms-fake/server'
import { DRAMA_MOBILE, freshAccount, inspected, smsFor, startCallbackReceiver, VALID_FROM } from './sms-fake-helpers'

/** The fake's own page and JSON API, modelled on the mail catcher's (maildev: GET /email, GET /email/:id, DELETE /email/all). */
describe('SMS fake: the page of received texts and its JSON API', () => {
  const cleanup: Array<() => Promise<void>> = []
  afterEach(async () => {
    for (const fn of cleanup.splice(0)) await fn()
  })

  async function fakeWith(options: SmsFakeOptions = {}): Promise<string> {
    const running = await createSmsFake({ stepMs: 10, ...options }).listen()
    cleanup.push(() => running.close())
    return running.url
  }

  it('lists every text newest first, with time, to, from, segments and status, all text escaped', async () => {
    const base = await fakeWith()
    const client = smsFor(freshAccount(), base)
    await client.messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: 'First: your Defender is booked in' })
    await client.messages.create({ to: '+447700900456', from: 'TICKOVER', body: `Second: ${'long '.repeat(40)}` })
    await client.messages.create({ to: '+447700900789', from: VALID_FROM, body: 'Third <script>alert("x")</script> & done 🙂' })

    const res = await fetch(`${base}/`)
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toMatch(/^text\/html/)
    const html = await res.text()
    expect(html).toContain('<meta name="viewport" content="width=device-width, initial-scale=1">')
    expect(html.indexOf('Third')).toBeLessThan(html.indexOf('Second'))
    expect(html.indexOf('Second')).toBeLessThan(html.indexOf('First'))
    expect(html).toContain('Third &lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; done 🙂')
    expect(html).not.toMatch(/<script/i)
    // No assets from anywhere: no scripts, images, fonts or stylesheets by URL.
    expect(html).not.toMatch(/\b(src|srcset)=|<link\b|@import|url\(|(href)="(https?:)?\/\//i)
    expect(html).toContain('+447700900456')
    expect(html).toContain('TICKOVER')
    // 200 GSM-7 characters: two segments of 153 (Twilio, "What the heck is a segment?").
    expect(html).toContain('2 (GSM-7)')
    expect(html).toContain('1 (UCS-2)')
    expect(html).toMatch(/<time datetime="\d{4}-\d{2}-\d{2}T/)
    expect(html).toMatch(/class="status [\w-]+">(queued|sending|sent|delivered)</)
  })

  it('says so when nothing has arrived', async () => {
    const html = await (await fetch(`${await fakeWith()}/`)).text()
    expect(html).toContain('No text messages yet')
  })

  it('GET /api/messages lists newest first, narrowed by account_sid or to; GET /api/messages/:sid shows one', async () => {
    const base = await fakeWith()
    const mine = freshAccount()
    const client = smsFor(mine, base)
    const first = await client.messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: 'one' })
    const second = await client.messages.create({ to: '+447700900456', from: VALID_FROM, body: 'two' })
    await smsFor(freshAccount(), base).messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: 'someone else’s' })

    expect((await inspected({}, base)).map((m) => m.body)).toEqual(['someone else’s', 'two', 'one'])
    expect((await inspected({ account_sid: mine.accountSid }, base)).map((m) => m.sid)).toEqual([second.sid, first.sid])
    expect((await inspected({ account_sid: mine.accountSid, to: DRAMA_MOBILE }, base)).map((m) => m.sid)).toEqual([first.sid])

    const res = await fetch(`${base}/api/messages/${first.sid}`)
    expect(res.status).toBe(200)
    const view = (await res.json()) as MessageView
    expect(view).toMatchObject({ sid: first.sid, account_sid: mine.accountSid, to: DRAMA_MOBILE, body: 'one', num_segments: '1' })
    expect(view.status_history[0]?.status).toBe('queued')
    expect((await fetch(`${base}/api/messages/SM${'0'.repeat(32)}`)).status).toBe(404)
  })

  it('DELETE /api/messages clears one account’s messages or all, and stops their pending callbacks', async () => {
    const base = await fakeWith({ stepMs: 300 })
    const receiver = await startCallbackReceiver()
    cleanup.push(() => receiver.close())
    const mine = freshAccount()
    const theirs = freshAccount()
    const { sid } = await smsFor(mine, base).messages.create({
      to: DRAMA_MOBILE,
      from: VALID_FROM,
      body: 'x',
      statusCallback: receiver.url,
    })
    await smsFor(theirs, base).messages.create({ to: DRAMA_MOBILE, from: VALID_FROM, body: 'y' })

    const cleared = await fetch(`${base}/api/messages?account_sid=${mine.accountSid}`, { method: 'DELETE' })
    expect(await cleared.json()).toEqual({ deleted: 1 })
    expect((await inspected({}, base)).map((m) => m.body)).toEqual(['y'])
    expect((await fetch(`${base}/api/messages/${sid}`)).status).toBe(404)
    const gone = await smsFor(mine, base)
      .messages(sid)
      .fetch()
      .catch((e: unknown) => e)
    expect(gone).toMatchObject({ status: 404, code: 20404 })
    await new Promise((r) => setTimeout(r, 1_000))
    expect(receiver.received).toEqual([])

    expect(await (await fetch(`${base}/api/messages`, { method: 'DELETE' })).json()).toEqual({ deleted: 1 })
    expect(await inspected({}, base)).toEqual([])
  })
})
