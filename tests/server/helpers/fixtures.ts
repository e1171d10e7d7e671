import { randomUUID } from 'node:crypto'
import request from 'supertest'
import type { Express } from 'express'
import type { Database } from '../../../server/db/client'
import { customers, jobs, staffUsers, vehicles, workshops } from '../../../server/db/schema'
import { linkIn, waitForMail } from './mail'

const tag = () => randomUUID().slice(0, 8)

/** A workshop of its own for one test: owner, advisor, technician, a customer with a vehicle and a job. */
export async function makeWorkshop(db: Database, name = 'Fixture Works') {
  const t = tag()
  const [shop] = await db
    .insert(workshops)
    .values({ name: `${name} ${t}` })
    .returning()
  if (!shop) throw new Error('no workshop')
  const staff = await db
    .insert(staffUsers)
    .values([
      { workshopId: shop.id, name: 'Olive Owner', email: `owner-${t}@fixture.test`, role: 'owner' as const },
      { workshopId: shop.id, name: 'Adam Advisor', email: `advisor-${t}@fixture.test`, role: 'advisor' as const },
      { workshopId: shop.id, name: 'Tess Technician', email: `tech-${t}@fixture.test`, role: 'technician' as const },
    ])
    .returning()
  const [customer] = await db
    .insert(customers)
    .values({ workshopId: shop.id, name: 'Carys Customer', email: `customer-${t}@fixture.test` })
    .returning()
  if (!customer) throw new Error('no customer')
  const [vehicle] = await db
    .insert(vehicles)
    .values({ workshopId: shop.id, customerId: customer.id, registration: `FX${t.slice(0, 4)}`, make: 'Testmake', model: 'Trail' })
    .returning()
  if (!vehicle) throw new Error('no vehicle')
  const [job] = await db
    .insert(jobs)
    .values({ workshopId: shop.id, vehicleId: vehicle.id, concern: 'Knock on take-up of drive' })
    .returning()
  if (!job) throw new Error('no job')
  const byRole = (role: string) => {
    const s = staff.find((x) => x.role === role)
    if (!s) throw new Error(`no ${role}`)
    return s
  }
  return { workshop: shop, owner: byRole('owner'), advisor: byRole('advisor'), technician: byRole('technician'), customer, vehicle, job }
}

export type Fixture = Awaited<ReturnType<typeof makeWorkshop>>

/** Requests carrying a same-origin browser's Origin header, with cookies kept between calls. */
export function browser(app: Express, origin = 'http://127.0.0.1:3000') {
  const agent = request.agent(app)
  const withOrigin = <T extends { set(k: string, v: string): T }>(r: T) => r.set('Origin', origin)
  return {
    agent,
    get: (path: string) => agent.get(path),
    post: (path: string, body?: object) => withOrigin(agent.post(path)).send(body ?? {}),
    put: (path: string, body?: object) => withOrigin(agent.put(path)).send(body ?? {}),
    patch: (path: string, body?: object) => withOrigin(agent.patch(path)).send(body ?? {}),
    delete: (path: string) => withOrigin(agent.delete(path)),
  }
}

export type Browser = ReturnType<typeof browser>

/** Signs in the way a person does: ask for a link, read it from the mail catcher, follow it. */
export async function signIn(app: Express, email: string, audience: 'staff' | 'customer' = 'staff'): Promise<Browser> {
  const b = browser(app)
  const since = Date.now()
  await b.post(`/api/auth/${audience}/link`, { email }).expect(202)
  const mail = await waitForMail(email, { since })
  const token = linkIn(mail).searchParams.get('token')
  await b.post('/api/auth/verify', { token: token ?? '' }).expect(200)
  return b
}
