import { createHash } from 'node:crypto'
import { eq, sql } from 'drizzle-orm'
import request from 'supertest'
import { afterAll, describe, expect, it } from 'vitest'
import { signInTokens } from '../../server/db/schema'
import { makeTestApp } from './helpers/app'
import { browser, makeWorkshop, signIn } from './helpers/fixtures'
import { linkIn, mailsTo, waitForMail } from './helpers/mail'

const t = makeTestApp()
afterAll(() => t.close())

async function requestLink(email: string) {
  const b = browser(t.app)
  const since = Date.now()
  const res = await b.post('/api/auth/staff/link', { email })
  return { b, res, since }
}

async function linkFor(email: string) {
  const { b, since } = await requestLink(email)
  const mail = await waitForMail(email, { since })
  return { b, mail, token: linkIn(mail).searchParams.get('token') ?? '' }
}

describe('staff sign-in by e-mail link', () => {
  it('signs in end to end through the mail catcher and reports the role', async () => {
    const f = await makeWorkshop(t.db)
    const b = await signIn(t.app, f.advisor.email)
    const me = await b.get('/api/auth/me').expect(200)
    expect(me.body.user).toMatchObject({ kind: 'staff', id: f.advisor.id, role: 'advisor', workshop: { id: f.workshop.id } })
  })

  it('builds the link from the configured base URL, never from the Host header', async () => {
    const f = await makeWorkshop(t.db)
    const since = Date.now()
    await request(t.app)
      .post('/api/auth/staff/link')
      .set('Origin', 'http://127.0.0.1:3000')
      .set('Host', 'evil.example')
      .send({ email: f.owner.email })
      .expect(202)
    const link = linkIn(await waitForMail(f.owner.email, { since }))
    expect(link.origin).toBe(t.env.PUBLIC_BASE_URL)
    expect(link.pathname).toBe('/sign-in/link')
  })

  it('answers identically for a known and an unknown address (no account enumeration)', async () => {
    const f = await makeWorkshop(t.db)
    const known = await requestLink(f.owner.email)
    const unknown = await requestLink(`nobody-${Date.now()}@fixture.test`)
    expect(known.res.status).toBe(202)
    expect(unknown.res.status).toBe(known.res.status)
    expect(unknown.res.body).toEqual(known.res.body)
    expect(Object.keys(unknown.res.headers).sort()).toEqual(Object.keys(known.res.headers).sort())
  })

  // OWASP ASVS 5.0 6.5.1: an out-of-band sign-in secret can be used only once.
  it('refuses a link that was already used', async () => {
    const f = await makeWorkshop(t.db)
    const { b, token } = await linkFor(f.technician.email)
    await b.post('/api/auth/verify', { token }).expect(200)
    const again = await browser(t.app).post('/api/auth/verify', { token }).expect(400)
    expect(again.body.error.code).toBe('link_invalid')
  })

  it('lets only one of two simultaneous uses of a link through', async () => {
    const f = await makeWorkshop(t.db)
    const { token } = await linkFor(f.advisor.email)
    const results = await Promise.all([1, 2, 3].map(() => browser(t.app).post('/api/auth/verify', { token })))
    expect(results.map((r) => r.status).sort()).toEqual([200, 400, 400])
  })

  // OWASP ASVS 5.0 6.5.5: out-of-band codes expire quickly (ours: 10 minutes).
  it('refuses an expired link', async () => {
    const f = await makeWorkshop(t.db)
    const { token } = await linkFor(f.owner.email)
    const hash = createHash('sha256').update(token).digest('hex')
    await t.db
      .update(signInTokens)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(signInTokens.tokenHash, hash))
    const res = await browser(t.app).post('/api/auth/verify', { token }).expect(400)
    expect(res.body.error.code).toBe('link_invalid')
  })

  it('stores sign-in links for 10 minutes', async () => {
    const f = await makeWorkshop(t.db)
    const before = Date.now()
    const { token } = await linkFor(f.owner.email)
    const hash = createHash('sha256').update(token).digest('hex')
    const [row] = await t.db.select().from(signInTokens).where(eq(signInTokens.tokenHash, hash))
    const lifetimeMs = (row?.expiresAt.getTime() ?? 0) - before
    expect(lifetimeMs).toBeGreaterThan(9 * 60_000)
    expect(lifetimeMs).toBeLessThanOrEqual(10 * 60_000 + 2000)
  })

  it('refuses a tampered link', async () => {
    const f = await makeWorkshop(t.db)
    const { token } = await linkFor(f.owner.email)
    const [header, payload, signature] = token.split('.')
    const flipped = `${signature?.slice(0, -2)}${signature?.endsWith('AA') ? 'BB' : 'AA'}`
    const res = await browser(t.app)
      .post('/api/auth/verify', { token: `${header}.${payload}.${flipped}` })
      .expect(400)
    expect(res.body.error.code).toBe('link_invalid')
  })

  // OWASP ASVS 5.0 6.5.2/11.x: the secret is stored only as a hash and carries at least 128 random bits.
  it('keeps only the SHA-256 of the token, and each token carries a 256-bit random nonce', async () => {
    const f = await makeWorkshop(t.db)
    const { token } = await linkFor(f.owner.email)
    const rows = await t.db.select().from(signInTokens).where(eq(signInTokens.staffUserId, f.owner.id))
    expect(rows.map((r) => r.tokenHash)).toContain(createHash('sha256').update(token).digest('hex'))
    expect(JSON.stringify(rows)).not.toContain(token)
    const payload = JSON.parse(Buffer.from(token.split('.')[1] ?? '', 'base64url').toString()) as { user: { nonce: string } }
    expect(Buffer.from(payload.user.nonce, 'base64url').length * 8).toBeGreaterThanOrEqual(128)
  })

  it('does not send a link to a deactivated account, and a link sent before deactivation stops working', async () => {
    const f = await makeWorkshop(t.db)
    const { token } = await linkFor(f.technician.email)
    const owner = await signIn(t.app, f.owner.email)
    await owner.post(`/api/staff/${f.technician.id}/deactivate`).expect(200)
    await browser(t.app).post('/api/auth/verify', { token }).expect(400)
    const count = (await mailsTo(f.technician.email)).length
    await requestLink(f.technician.email)
    await new Promise((r) => setTimeout(r, 500))
    expect((await mailsTo(f.technician.email)).length).toBe(count)
  })
})

describe('sessions', () => {
  it('gives a new session id at sign-in', async () => {
    const f = await makeWorkshop(t.db)
    const b = browser(t.app)
    const csrf = await b.get('/api/auth/csrf').expect(200)
    const before = cookieValue(csrf.headers['set-cookie'])
    expect(before).toBeTruthy()
    const since = Date.now()
    await b.post('/api/auth/staff/link', { email: f.owner.email }).expect(202)
    const token = linkIn(await waitForMail(f.owner.email, { since })).searchParams.get('token')
    const verified = await b.post('/api/auth/verify', { token }).expect(200)
    const after = cookieValue(verified.headers['set-cookie'])
    expect(after).toBeTruthy()
    expect(after).not.toBe(before)
  })

  it('sets the cookie HttpOnly and SameSite=Lax', async () => {
    const f = await makeWorkshop(t.db)
    const { b, token } = await linkFor(f.owner.email)
    const res = await b.post('/api/auth/verify', { token }).expect(200)
    const cookie = String(res.headers['set-cookie'])
    expect(cookie).toMatch(/HttpOnly/i)
    expect(cookie).toMatch(/SameSite=Lax/i)
  })

  it('ends the session on the server at sign-out', async () => {
    const f = await makeWorkshop(t.db)
    const b = await signIn(t.app, f.advisor.email)
    const stolenCookie = cookieHeader(b)
    await b.post('/api/auth/sign-out').expect(204)
    const replay = await request(t.app).get('/api/staff').set('Cookie', stolenCookie).expect(401)
    expect(replay.body.error.code).toBe('unauthorized')
  })

  it('ends every session of someone deactivated', async () => {
    const f = await makeWorkshop(t.db)
    const tech = await signIn(t.app, f.technician.email)
    await tech.get('/api/workshop').expect(200)
    const owner = await signIn(t.app, f.owner.email)
    await owner.post(`/api/staff/${f.technician.id}/deactivate`).expect(200)
    await tech.get('/api/workshop').expect(401)
    const [left] = (
      await t.db.execute(sql`select count(*)::int as n from sessions where sess->'passport'->'user'->>'id' = ${f.technician.id}`)
    ).rows as { n: number }[]
    expect(left?.n).toBe(0)
  })

  it('ends a session after its absolute lifetime, however busy', async () => {
    const short = makeTestApp({ SESSION_ABSOLUTE_HOURS: '1' })
    try {
      const f = await makeWorkshop(short.db)
      const b = await signIn(short.app, f.owner.email)
      await b.get('/api/workshop').expect(200)
      await short.db.execute(
        sql`update sessions set sess = jsonb_set(sess::jsonb, '{signedInAt}', to_jsonb(${Date.now() - 3_600_000 - 1000}::bigint))::json where sess->'passport'->'user'->>'id' = ${f.owner.id}`,
      )
      await b.get('/api/workshop').expect(401)
    } finally {
      await short.close()
    }
  })
})

describe('CSRF protection', () => {
  it('refuses a state-changing request from another site', async () => {
    const f = await makeWorkshop(t.db)
    const b = await signIn(t.app, f.owner.email)
    const res = await b.agent.post('/api/auth/sign-out').set('Origin', 'https://attacker.example').expect(403)
    expect(res.body.error.code).toBe('csrf_rejected')
    const res2 = await b.agent.post('/api/auth/sign-out').set('Sec-Fetch-Site', 'cross-site').expect(403)
    expect(res2.body.error.code).toBe('csrf_rejected')
  })

  it('refuses a state-changing request with neither origin information nor a token', async () => {
    const f = await makeWorkshop(t.db)
    const b = await signIn(t.app, f.owner.email)
    const res = await b.agent.put('/api/workshop').send({}).expect(403)
    expect(res.body.error.code).toBe('csrf_rejected')
  })

  it('accepts the session CSRF token when a client sends no origin information', async () => {
    const f = await makeWorkshop(t.db)
    const b = await signIn(t.app, f.owner.email)
    const { body } = await b.get('/api/auth/csrf').expect(200)
    await b.agent
      .post('/api/auth/sign-out')
      .set('X-CSRF-Token', body.token as string)
      .expect(204)
  })

  it('accepts same-origin browser requests', async () => {
    const f = await makeWorkshop(t.db)
    const b = await signIn(t.app, f.owner.email)
    await b.agent.post('/api/auth/sign-out').set('Sec-Fetch-Site', 'same-origin').expect(204)
  })
})

describe('rate limits on sign-in requests', () => {
  it('limits requests per e-mail address across IPs', async () => {
    const limited = makeTestApp({ RATE_LIMITS: 'true', TRUST_PROXY: 'true' })
    try {
      const email = `limit-${Date.now()}@fixture.test`
      const statuses: number[] = []
      for (let i = 0; i < 7; i++) {
        const res = await request(limited.app)
          .post('/api/auth/staff/link')
          .set('Origin', 'http://127.0.0.1:3000')
          .set('X-Forwarded-For', `198.51.100.${i + 1}`)
          .send({ email })
        statuses.push(res.status)
      }
      expect(statuses.slice(0, 5)).toEqual([202, 202, 202, 202, 202])
      expect(statuses.slice(5)).toEqual([429, 429])
    } finally {
      await limited.close()
    }
  })

  it('limits requests per IP across addresses, and the limit is shared by two server processes', async () => {
    const a = makeTestApp({ RATE_LIMITS: 'true', TRUST_PROXY: 'true' })
    const b = makeTestApp({ RATE_LIMITS: 'true', TRUST_PROXY: 'true' })
    try {
      const ip = `203.0.113.${Math.floor(Math.random() * 250) + 1}`
      await a.pool.query('delete from rate_limits where key like $1', [`link-ip:${ip}%`])
      const statuses: number[] = []
      for (let i = 0; i < 22; i++) {
        const app = i % 2 === 0 ? a.app : b.app
        const res = await request(app)
          .post('/api/auth/staff/link')
          .set('Origin', 'http://127.0.0.1:3000')
          .set('X-Forwarded-For', ip)
          .send({ email: `n${i}-${Date.now()}@fixture.test` })
        statuses.push(res.status)
      }
      expect(statuses.filter((s) => s === 202)).toHaveLength(20)
      expect(statuses.slice(20)).toEqual([429, 429])
    } finally {
      await a.close()
      await b.close()
    }
  })
})

describe('bad input', () => {
  it('answers an invalid e-mail with 422 and the field', async () => {
    const res = await browser(t.app).post('/api/auth/staff/link', { email: 'not-an-address' }).expect(422)
    expect(res.body.error.issues[0].path).toEqual(['body', 'email'])
  })
})

function cookieValue(setCookie: string | string[] | undefined): string | undefined {
  const list = Array.isArray(setCookie) ? setCookie : setCookie ? [setCookie] : []
  return list.map((c) => /^tickover\.sid=([^;]+)/.exec(c)?.[1]).find(Boolean)
}

function cookieHeader(b: ReturnType<typeof browser>): string {
  const jar = (b.agent as unknown as { jar: { getCookies(a: unknown): { name: string; value: string }[] } }).jar
  return jar
    .getCookies({ domain: '127.0.0.1', path: '/', secure: false, script: false })
    .map((c) => `${c.name}=${c.value}`)
    .join('; ')
}
