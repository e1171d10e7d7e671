import { afterAll, describe, expect, it } from 'vitest'
import { makeTestApp } from './helpers/app'
import { browser, makeWorkshop, signIn } from './helpers/fixtures'
import { linkIn, waitForMail } from './helpers/mail'

const t = makeTestApp()
afterAll(() => t.close())

describe('owner manages staff', () => {
  it('invites someone, who receives a sign-in link and can sign in with the given role', async () => {
    const f = await makeWorkshop(t.db)
    const owner = await signIn(t.app, f.owner.email)
    const email = `new-${Date.now()}@fixture.test`
    const since = Date.now()
    const res = await owner.post('/api/staff', { name: 'Nia Newcomer', email, role: 'technician' }).expect(201)
    expect(res.body).toMatchObject({ name: 'Nia Newcomer', email, role: 'technician', active: true })
    const mail = await waitForMail(email, { since })
    expect(mail.subject).toMatch(/added to/)
    expect(mail.text).toContain('Olive Owner has added you')
    const token = linkIn(mail).searchParams.get('token')
    const b = browser(t.app)
    const verified = await b.post('/api/auth/verify', { token }).expect(200)
    expect(verified.body.user).toMatchObject({ role: 'technician', workshop: { id: f.workshop.id } })
    const audit = await owner.get('/api/audit-events?action=staff.invited').expect(200)
    expect(audit.body.items[0].details).toMatchObject({ role: 'technician', email })
  })

  it('refuses an e-mail address already in use', async () => {
    const f = await makeWorkshop(t.db)
    const owner = await signIn(t.app, f.owner.email)
    const res = await owner.post('/api/staff', { name: 'Copy', email: f.advisor.email.toUpperCase(), role: 'advisor' }).expect(409)
    expect(res.body.error.code).toBe('email_taken')
  })

  it('changes a role, which takes effect on the next request', async () => {
    const f = await makeWorkshop(t.db)
    const owner = await signIn(t.app, f.owner.email)
    const tech = await signIn(t.app, f.technician.email)
    await tech.get('/api/audit-events').expect(403)
    await owner.patch(`/api/staff/${f.technician.id}/role`, { role: 'owner' }).expect(200)
    await tech.get('/api/audit-events').expect(200)
    const log = await owner.get('/api/audit-events?action=staff.role_changed').expect(200)
    expect(log.body.items[0].details).toEqual({ from: 'technician', to: 'owner' })
  })

  it('keeps at least one active owner', async () => {
    const f = await makeWorkshop(t.db)
    const owner = await signIn(t.app, f.owner.email)
    const res = await owner.patch(`/api/staff/${f.owner.id}/role`, { role: 'advisor' }).expect(409)
    expect(res.body.error.code).toBe('last_owner')
    await owner.post(`/api/staff/${f.owner.id}/deactivate`).expect(409)
  })

  it('answers 404 for another workshop’s member of staff', async () => {
    const a = await makeWorkshop(t.db)
    const b = await makeWorkshop(t.db)
    const ownerB = await signIn(t.app, b.owner.email)
    await ownerB.post(`/api/staff/${a.advisor.id}/deactivate`).expect(404)
    await ownerB.patch(`/api/staff/${a.advisor.id}/role`, { role: 'owner' }).expect(404)
    const list = await ownerB.get('/api/staff').expect(200)
    expect((list.body.items as { id: string }[]).map((s) => s.id)).not.toContain(a.advisor.id)
  })

  it('answers a malformed id with 422, not 500', async () => {
    const f = await makeWorkshop(t.db)
    const owner = await signIn(t.app, f.owner.email)
    const res = await owner.post('/api/staff/not-a-uuid/deactivate').expect(422)
    expect(res.body.error.issues[0].path).toEqual(['params', 'id'])
  })
})

describe('workshop settings', () => {
  it('saves valid settings and records what changed', async () => {
    const f = await makeWorkshop(t.db)
    const owner = await signIn(t.app, f.owner.email)
    const current = (await owner.get('/api/workshop').expect(200)).body
    const res = await owner
      .put('/api/workshop', {
        ...current,
        id: undefined,
        phone: '01632 960999',
        vatNumber: 'GB123456789',
        addressLines: ['1 Test Row', 'Testbury'],
      })
      .expect(200)
    expect(res.body).toMatchObject({ phone: '01632 960999', vatNumber: 'GB123456789' })
    const log = await owner.get('/api/audit-events?action=settings.changed').expect(200)
    expect(Object.keys(log.body.items[0].details.changed).sort()).toEqual(['addressLines', 'phone', 'vatNumber'])
  })

  it('names each bad field', async () => {
    const f = await makeWorkshop(t.db)
    const owner = await signIn(t.app, f.owner.email)
    const res = await owner.put('/api/workshop', { name: '', addressLines: [], currency: 'pounds', timezone: 'Mars/Olympus' }).expect(422)
    const paths = (res.body.error.issues as { path: string[] }[]).map((i) => i.path.join('.')).sort()
    expect(paths).toEqual(['body.currency', 'body.name', 'body.timezone'])
  })

  it('lets an advisor read but not change the settings', async () => {
    const f = await makeWorkshop(t.db)
    const advisor = await signIn(t.app, f.advisor.email)
    await advisor.get('/api/workshop').expect(200)
    await advisor.put('/api/workshop', { name: 'Mine now' }).expect(403)
  })
})

describe('customer portal sign-in', () => {
  it('lets a customer sign in by link and see only their own vehicles', async () => {
    const f = await makeWorkshop(t.db)
    const customer = await signIn(t.app, f.customer.email ?? '', 'customer')
    const me = await customer.get('/api/auth/me').expect(200)
    expect(me.body.user).toMatchObject({ kind: 'customer', id: f.customer.id })
    const vehicles = await customer.get('/api/portal/vehicles').expect(200)
    expect(vehicles.body.items).toEqual([expect.objectContaining({ id: f.vehicle.id, registration: f.vehicle.registration })])
    await customer.get('/api/staff').expect(403)
  })
})
