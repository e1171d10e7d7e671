/**
 * Workshop records: customers, vehicles and jobs. VIN rules are ISO 3779 (17 characters, the letters
 * I, O and Q never used); every name, plate and VIN here is invented.
 */
import { eq } from 'drizzle-orm'
import { afterAll, describe, expect, it } from 'vitest'
import { staffUsers } from '../../server/db/schema'
import { makeTestApp } from './helpers/app'
import { type Browser, type Fixture, makeWorkshop, signIn } from './helpers/fixtures'

const t = makeTestApp()
afterAll(() => t.close())

interface Issue {
  path: (string | number)[]
  message: string
}

async function advisorOf(name = 'Records Works'): Promise<{ f: Fixture; advisor: Browser }> {
  const f = await makeWorkshop(t.db, name)
  return { f, advisor: await signIn(t.app, f.advisor.email) }
}

/** The issues of a 422 answer, keyed by their dotted path. */
function issuesOf(body: { error: { code: string; issues?: Issue[] } }): Record<string, string[]> {
  expect(body.error.code).toBe('validation_failed')
  const byPath: Record<string, string[]> = {}
  for (const i of body.error.issues ?? []) (byPath[i.path.join('.')] ??= []).push(i.message)
  return byPath
}

const names = (items: { name: string }[]) => items.map((i) => i.name)
const plates = (items: { registration: string }[]) => items.map((i) => i.registration)

describe('customers', () => {
  it('creates, reads and updates a customer', async () => {
    const { advisor } = await advisorOf()
    const created = await advisor
      .post('/api/customers', {
        name: '  Wynn Ashgrove ',
        email: 'Wynn.Ashgrove@Example.TEST',
        phone: '07700 900101',
        addressLines: ['3 Fellside', 'Marrick End'],
        postcode: 'BF6 2ZZ',
        contactByEmail: true,
        contactBySms: true,
      })
      .expect(201)
    expect(created.body).toMatchObject({
      name: 'Wynn Ashgrove',
      email: 'wynn.ashgrove@example.test',
      phone: '07700 900101',
      addressLines: ['3 Fellside', 'Marrick End'],
      contactBySms: true,
      contactByPhone: false,
      archived: false,
      vehicleCount: 0,
    })

    const read = await advisor.get(`/api/customers/${created.body.id}`).expect(200)
    expect(read.body).toEqual(created.body)

    const updated = await advisor
      .put(`/api/customers/${created.body.id}`, {
        name: 'Wynn Ashgrove-Pell',
        phone: '07700 900102',
        contactByEmail: false,
        contactByPhone: true,
      })
      .expect(200)
    expect(updated.body).toMatchObject({ name: 'Wynn Ashgrove-Pell', phone: '07700 900102', contactByPhone: true, contactBySms: false })
  })

  it('replaces the whole record on update, clearing optional fields left out', async () => {
    const { f, advisor } = await advisorOf()
    const res = await advisor
      .put(`/api/customers/${f.customer.id}`, { name: 'Carys Customer', phone: '07700 900200', contactByEmail: false })
      .expect(200)
    expect(res.body).toMatchObject({ email: null, phone: '07700 900200', postcode: null, addressLines: [] })
  })

  it('lists customers a page at a time, sorted either way', async () => {
    const { advisor } = await advisorOf()
    for (const name of ['Ezra Eve', 'Aled Ashby', 'Dora Dale', 'Bea Brook']) {
      await advisor.post('/api/customers', { name, phone: '07700 900300', contactByEmail: false }).expect(201)
    }
    // The fixture's own customer, Carys Customer, sorts in the middle.
    const first = await advisor.get('/api/customers?page=1&pageSize=2&sortBy=name').expect(200)
    expect(first.body).toMatchObject({ total: 5, page: 1, pageSize: 2 })
    expect(names(first.body.items)).toEqual(['Aled Ashby', 'Bea Brook'])
    const second = await advisor.get('/api/customers?page=2&pageSize=2&sortBy=name').expect(200)
    expect(names(second.body.items)).toEqual(['Carys Customer', 'Dora Dale'])
    const last = await advisor.get('/api/customers?page=3&pageSize=2&sortBy=name').expect(200)
    expect(names(last.body.items)).toEqual(['Ezra Eve'])
    const backwards = await advisor.get('/api/customers?pageSize=2&sortBy=name&sortDesc=true').expect(200)
    expect(names(backwards.body.items)).toEqual(['Ezra Eve', 'Dora Dale'])
  })

  it('searches by name, e-mail, phone (with or without spaces) and postcode', async () => {
    const { advisor } = await advisorOf()
    await advisor
      .post('/api/customers', { name: 'Lowri Pennant', email: 'lowri@hillfarm.test', phone: '07700 900411', postcode: 'BF9 3QT' })
      .expect(201)
    await advisor.post('/api/customers', { name: 'Gethin Marsh', phone: '07700 900522', contactByEmail: false }).expect(201)

    for (const q of ['pennant', 'HILLFARM', '07700900411', '900 411', 'bf9 3q']) {
      const res = await advisor.get(`/api/customers?q=${encodeURIComponent(q)}`).expect(200)
      expect(names(res.body.items), q).toEqual(['Lowri Pennant'])
      expect(res.body.total).toBe(1)
    }
    const none = await advisor.get('/api/customers?q=nobody-by-this-name').expect(200)
    expect(none.body).toMatchObject({ items: [], total: 0 })
  })

  it('treats % and _ in a search as plain characters', async () => {
    const { advisor } = await advisorOf()
    await advisor.post('/api/customers', { name: 'Percy 100% Plant', phone: '07700 900600', contactByEmail: false }).expect(201)
    const res = await advisor.get(`/api/customers?q=${encodeURIComponent('0%')}`).expect(200)
    expect(names(res.body.items)).toEqual(['Percy 100% Plant'])
  })

  it('names each bad field', async () => {
    const { advisor } = await advisorOf()
    const empty = await advisor.post('/api/customers', { name: ' ', email: 'not-an-address' }).expect(422)
    const issues = issuesOf(empty.body)
    expect(Object.keys(issues).sort()).toEqual(['body.email', 'body.name'])
    expect(issues['body.email']).toEqual(['Enter a valid e-mail address, like name@example.com'])
  })

  it('needs an e-mail address or a phone number', async () => {
    const { advisor } = await advisorOf()
    const res = await advisor.post('/api/customers', { name: 'Unreachable Ulla', email: '', phone: '', contactByEmail: false }).expect(422)
    expect(issuesOf(res.body)).toEqual({ 'body.email': ['Enter an e-mail address or a phone number'] })
  })

  it('will not contact by e-mail without an e-mail address, nor by phone without a number', async () => {
    const { advisor } = await advisorOf()
    const byEmail = await advisor
      .post('/api/customers', { name: 'Phone-only Phil', phone: '07700 900700', contactByEmail: true })
      .expect(422)
    expect(issuesOf(byEmail.body)).toEqual({ 'body.contactByEmail': ['Add an e-mail address to contact them by e-mail'] })
    const bySms = await advisor.post('/api/customers', { name: 'Mail-only Mo', email: 'mo@fixture.test', contactBySms: true }).expect(422)
    expect(issuesOf(bySms.body)).toEqual({ 'body.phone': ['Add a phone number to contact them by phone or text'] })
  })

  it('archives a customer out of the default list and restores them', async () => {
    const { f, advisor } = await advisorOf()
    const archived = await advisor.post(`/api/customers/${f.customer.id}/archive`).expect(200)
    expect(archived.body).toMatchObject({ id: f.customer.id, archived: true })
    expect((await advisor.get('/api/customers').expect(200)).body).toMatchObject({ items: [], total: 0 })
    const archivedList = await advisor.get('/api/customers?archived=true').expect(200)
    expect(archivedList.body.items.map((c: { id: string }) => c.id)).toEqual([f.customer.id])
    // Still there by id, so links from old jobs keep working.
    await advisor.get(`/api/customers/${f.customer.id}`).expect(200)

    const restored = await advisor.post(`/api/customers/${f.customer.id}/restore`).expect(200)
    expect(restored.body.archived).toBe(false)
    expect(names((await advisor.get('/api/customers').expect(200)).body.items)).toEqual(['Carys Customer'])
  })

  it('refuses to delete a customer who has vehicles, and keeps them', async () => {
    const { f, advisor } = await advisorOf()
    const res = await advisor.delete(`/api/customers/${f.customer.id}`).expect(409)
    expect(res.body.error.code).toBe('in_use')
    expect(res.body.error.message).toMatch(/Archive them instead/)
    await advisor.get(`/api/customers/${f.customer.id}`).expect(200)
  })

  it('deletes a customer nothing refers to', async () => {
    const { advisor } = await advisorOf()
    const created = await advisor.post('/api/customers', { name: 'Brief Bryn', phone: '07700 900800', contactByEmail: false }).expect(201)
    await advisor.delete(`/api/customers/${created.body.id}`).expect(204)
    await advisor.get(`/api/customers/${created.body.id}`).expect(404)
  })
})

describe('vehicles', () => {
  const vehicle = (customerId: string, extra: object = {}) => ({
    customerId,
    registration: 'bf21 nmx',
    make: 'Corrin',
    model: 'Stag 90',
    ...extra,
  })

  it('creates, reads and updates a vehicle, upper-casing the plate and VIN', async () => {
    const { f, advisor } = await advisorOf()
    const created = await advisor
      .post(
        '/api/vehicles',
        vehicle(f.customer.id, { vin: ' skf4x4dem10000017 ', year: 2012, odometer: 120500, vehicleGroup: 'coil-sprung-live-axle' }),
      )
      .expect(201)
    expect(created.body).toMatchObject({
      customerId: f.customer.id,
      customerName: 'Carys Customer',
      registration: 'BF21 NMX',
      vin: 'SKF4X4DEM10000017',
      year: 2012,
      odometer: 120500,
      odometerUnit: 'mi',
      archived: false,
    })
    expect((await advisor.get(`/api/vehicles/${created.body.id}`).expect(200)).body).toEqual(created.body)

    const updated = await advisor
      .put(`/api/vehicles/${created.body.id}`, vehicle(f.customer.id, { odometer: 121000, odometerUnit: 'km' }))
      .expect(200)
    // Left out of the PUT, so cleared: PUT replaces the record.
    expect(updated.body).toMatchObject({ odometer: 121000, odometerUnit: 'km', vin: null, year: null, vehicleGroup: null })
  })

  it('refuses a VIN with an O, naming only that fault', async () => {
    const { f, advisor } = await advisorOf()
    const res = await advisor.post('/api/vehicles', vehicle(f.customer.id, { vin: 'SKF4X4DEM1000O017' })).expect(422)
    expect(issuesOf(res.body)).toEqual({ 'body.vin': ['A VIN never contains the letters I, O or Q (ISO 3779)'] })
  })

  it('refuses a VIN of 16 characters, naming only its length', async () => {
    const { f, advisor } = await advisorOf()
    const res = await advisor.post('/api/vehicles', vehicle(f.customer.id, { vin: 'SKF4X4DEM1000017' })).expect(422)
    expect(issuesOf(res.body)).toEqual({ 'body.vin': ['A VIN has exactly 17 characters'] })
  })

  it('names each bad field', async () => {
    const { advisor } = await advisorOf()
    const res = await advisor
      .post('/api/vehicles', {
        customerId: 'nobody',
        registration: '',
        make: '',
        model: 'Stag',
        year: 1800,
        odometer: -5,
        vin: 'SKF4X4DEM1000-017',
      })
      .expect(422)
    const issues = issuesOf(res.body)
    expect(Object.keys(issues).sort()).toEqual([
      'body.customerId',
      'body.make',
      'body.odometer',
      'body.registration',
      'body.vin',
      'body.year',
    ])
    expect(issues['body.vin']).toEqual(['A VIN has only letters and digits'])
  })

  it('takes only a customer of the same workshop as keeper', async () => {
    const { f, advisor } = await advisorOf()
    const other = await makeWorkshop(t.db, 'Elsewhere')
    const res = await advisor.post('/api/vehicles', vehicle(other.customer.id)).expect(422)
    expect(issuesOf(res.body)).toEqual({ 'body.customerId': ['Choose a customer of this workshop'] })
    const moved = await advisor.put(`/api/vehicles/${f.vehicle.id}`, vehicle(other.customer.id)).expect(422)
    expect(Object.keys(issuesOf(moved.body))).toEqual(['body.customerId'])
    expect((await advisor.get(`/api/vehicles/${f.vehicle.id}`).expect(200)).body.customerId).toBe(f.customer.id)
  })

  it('lists vehicles paged and sorted, filtered by keeper', async () => {
    const { f, advisor } = await advisorOf()
    const other = await advisor.post('/api/customers', { name: 'Second Keeper', phone: '07700 900900', contactByEmail: false }).expect(201)
    await advisor.post('/api/vehicles', vehicle(f.customer.id, { registration: 'AA11 AAA', make: 'Zephan' })).expect(201)
    await advisor.post('/api/vehicles', vehicle(other.body.id, { registration: 'ZZ99 ZZZ', make: 'Argent' })).expect(201)

    const byPlate = await advisor.get('/api/vehicles?sortBy=registration&pageSize=2').expect(200)
    expect(byPlate.body.total).toBe(3)
    expect(plates(byPlate.body.items)).toEqual(['AA11 AAA', f.vehicle.registration])
    const page2 = await advisor.get('/api/vehicles?sortBy=registration&pageSize=2&page=2').expect(200)
    expect(plates(page2.body.items)).toEqual(['ZZ99 ZZZ'])
    const byMake = await advisor.get('/api/vehicles?sortBy=make&sortDesc=true').expect(200)
    expect(byMake.body.items.map((v: { make: string }) => v.make)).toEqual(['Zephan', 'Testmake', 'Argent'])
    const keeper = await advisor.get(`/api/vehicles?customerId=${other.body.id}`).expect(200)
    expect(plates(keeper.body.items)).toEqual(['ZZ99 ZZZ'])
  })

  it('finds a vehicle by its plate typed with or without the space, VIN, make, model or keeper', async () => {
    const { f, advisor } = await advisorOf()
    await advisor
      .post(
        '/api/vehicles',
        vehicle(f.customer.id, { registration: 'BF19 KRT', vin: 'SKF4X4DEM10000017', make: 'Ridgeback', model: 'Fellrunner' }),
      )
      .expect(201)
    for (const q of ['bf19krt', 'BF19 KRT', '19 k', 'DEM1000', 'ridgeback', 'fellrun']) {
      const res = await advisor.get(`/api/vehicles?q=${encodeURIComponent(q)}`).expect(200)
      expect(plates(res.body.items), q).toEqual(['BF19 KRT'])
    }
    const keeper = await advisor.get('/api/vehicles?q=carys').expect(200)
    expect(keeper.body.total).toBe(2)
  })

  it('archives a vehicle out of the default list and restores it', async () => {
    const { f, advisor } = await advisorOf()
    expect((await advisor.get(`/api/customers/${f.customer.id}`).expect(200)).body.vehicleCount).toBe(1)
    expect((await advisor.get('/api/customers').expect(200)).body.items[0]).toMatchObject({ id: f.customer.id, vehicleCount: 1 })
    await advisor.post(`/api/vehicles/${f.vehicle.id}/archive`).expect(200)
    expect((await advisor.get('/api/vehicles').expect(200)).body.total).toBe(0)
    expect(plates((await advisor.get('/api/vehicles?archived=true').expect(200)).body.items)).toEqual([f.vehicle.registration])
    // An archived vehicle no longer counts towards its keeper's vehicles.
    expect((await advisor.get(`/api/customers/${f.customer.id}`).expect(200)).body.vehicleCount).toBe(0)
    const restored = await advisor.post(`/api/vehicles/${f.vehicle.id}/restore`).expect(200)
    expect(restored.body.archived).toBe(false)
    expect(plates((await advisor.get('/api/vehicles').expect(200)).body.items)).toEqual([f.vehicle.registration])
  })

  it('refuses to delete a vehicle with jobs, and deletes one without', async () => {
    const { f, advisor } = await advisorOf()
    const refused = await advisor.delete(`/api/vehicles/${f.vehicle.id}`).expect(409)
    expect(refused.body.error).toMatchObject({ code: 'in_use', message: expect.stringMatching(/Archive it instead/) })
    await advisor.get(`/api/vehicles/${f.vehicle.id}`).expect(200)

    const spare = await advisor.post('/api/vehicles', vehicle(f.customer.id)).expect(201)
    await advisor.delete(`/api/vehicles/${spare.body.id}`).expect(204)
    await advisor.get(`/api/vehicles/${spare.body.id}`).expect(404)
  })
})

describe('jobs', () => {
  it('opens, reads and updates a job with the vehicle, keeper and technician named', async () => {
    const { f, advisor } = await advisorOf()
    const created = await advisor
      .post('/api/jobs', {
        vehicleId: f.vehicle.id,
        concern: '  Loss of drive after crossing a ford ',
        technicianId: f.technician.id,
        bookedFor: '2026-03-02',
        promisedFor: '2026-03-04',
      })
      .expect(201)
    expect(created.body).toMatchObject({
      vehicleId: f.vehicle.id,
      registration: f.vehicle.registration,
      vehicleDescription: 'Testmake Trail',
      customerId: f.customer.id,
      customerName: 'Carys Customer',
      concern: 'Loss of drive after crossing a ford',
      status: 'booked_in',
      technicianName: 'Tess Technician',
      bookedFor: '2026-03-02',
      promisedFor: '2026-03-04',
    })
    expect((await advisor.get(`/api/jobs/${created.body.id}`).expect(200)).body).toEqual(created.body)

    const updated = await advisor
      .put(`/api/jobs/${created.body.id}`, {
        vehicleId: f.vehicle.id,
        concern: 'Loss of drive after crossing a ford',
        status: 'inspecting',
        technicianId: f.technician.id,
        bookedFor: '2026-03-02',
      })
      .expect(200)
    expect(updated.body).toMatchObject({ status: 'inspecting', promisedFor: null })
  })

  it('clears the dates and technician a PUT leaves out, so a new promised date is checked against the new booking only', async () => {
    const { f, advisor } = await advisorOf()
    const created = await advisor
      .post('/api/jobs', { vehicleId: f.vehicle.id, concern: 'Judder on take-up', technicianId: f.technician.id, bookedFor: '2026-05-10' })
      .expect(201)
    const res = await advisor
      .put(`/api/jobs/${created.body.id}`, { vehicleId: f.vehicle.id, concern: 'Judder on take-up', promisedFor: '2026-05-01' })
      .expect(200)
    expect(res.body).toMatchObject({ bookedFor: null, promisedFor: '2026-05-01', technicianId: null, technicianName: null })
  })

  it('names each bad field', async () => {
    const { f, advisor } = await advisorOf()
    const res = await advisor
      .post('/api/jobs', { vehicleId: f.vehicle.id, concern: '   ', status: 'sleeping', bookedFor: '02/03/2026' })
      .expect(422)
    const issues = issuesOf(res.body)
    expect(Object.keys(issues).sort()).toEqual(['body.bookedFor', 'body.concern', 'body.status'])
    expect(issues['body.concern']).toEqual(['Write down the customer’s concern in their words'])
    const missing = await advisor.post('/api/jobs', { vehicleId: f.vehicle.id }).expect(422)
    expect(issuesOf(missing.body)).toEqual({ 'body.concern': ['Write down the customer’s concern in their words'] })
  })

  it('refuses a promised date before the booking', async () => {
    const { f, advisor } = await advisorOf()
    const res = await advisor
      .post('/api/jobs', { vehicleId: f.vehicle.id, concern: 'Clonk over bumps', bookedFor: '2026-04-10', promisedFor: '2026-04-09' })
      .expect(422)
    expect(issuesOf(res.body)).toEqual({ 'body.promisedFor': ['The promised date cannot be before the booking date'] })
  })

  it('takes only a vehicle and technician of the same workshop', async () => {
    const { f, advisor } = await advisorOf()
    const other = await makeWorkshop(t.db, 'Elsewhere')
    const res = await advisor
      .post('/api/jobs', { vehicleId: other.vehicle.id, concern: 'Whine at speed', technicianId: other.technician.id })
      .expect(422)
    expect(issuesOf(res.body)).toEqual({
      'body.vehicleId': ['Choose a vehicle of this workshop'],
      'body.technicianId': ['Choose an active member of this workshop'],
    })
    const put = await advisor
      .put(`/api/jobs/${f.job.id}`, { vehicleId: f.vehicle.id, concern: 'Whine at speed', technicianId: other.technician.id })
      .expect(422)
    expect(Object.keys(issuesOf(put.body))).toEqual(['body.technicianId'])
  })

  it('assigns no one who has left, but keeps them on the jobs they already had', async () => {
    const { f, advisor } = await advisorOf()
    const assigned = { vehicleId: f.vehicle.id, concern: 'Knock on take-up of drive', technicianId: f.technician.id }
    await advisor.put(`/api/jobs/${f.job.id}`, assigned).expect(200)
    await t.db.update(staffUsers).set({ deactivatedAt: new Date() }).where(eq(staffUsers.id, f.technician.id))

    const edited = await advisor.put(`/api/jobs/${f.job.id}`, { ...assigned, status: 'finished' }).expect(200)
    expect(edited.body).toMatchObject({ status: 'finished', technicianName: 'Tess Technician' })
    const fresh = await advisor.post('/api/jobs', assigned).expect(422)
    expect(Object.keys(issuesOf(fresh.body))).toEqual(['body.technicianId'])
  })

  it('lists jobs newest first, filtered, searched and sorted', async () => {
    const { f, advisor } = await advisorOf()
    const second = await advisor
      .post('/api/vehicles', { customerId: f.customer.id, registration: 'BF19 KRT', make: 'Ridgeback', model: 'Fellrunner' })
      .expect(201)
    const vibration = await advisor
      .post('/api/jobs', { vehicleId: second.body.id, concern: 'Vibration above 50 mph', status: 'quoting', bookedFor: '2026-06-01' })
      .expect(201)
    const oil = await advisor
      .post('/api/jobs', {
        vehicleId: f.vehicle.id,
        concern: 'Oil inside the front wheels',
        technicianId: f.technician.id,
        bookedFor: '2026-05-01',
      })
      .expect(201)
    const ids = (res: { body: { items: { id: string }[] } }) => res.body.items.map((j) => j.id)

    const all = await advisor.get('/api/jobs').expect(200)
    expect(all.body.total).toBe(3)
    expect(ids(all)).toEqual([oil.body.id, vibration.body.id, f.job.id])
    expect(ids(await advisor.get('/api/jobs?pageSize=1&page=2').expect(200))).toEqual([vibration.body.id])

    expect(ids(await advisor.get('/api/jobs?status=quoting').expect(200))).toEqual([vibration.body.id])
    expect(ids(await advisor.get(`/api/jobs?technicianId=${f.technician.id}`).expect(200))).toEqual([oil.body.id])
    expect(ids(await advisor.get(`/api/jobs?vehicleId=${second.body.id}`).expect(200))).toEqual([vibration.body.id])
    expect(ids(await advisor.get('/api/jobs?q=50%20mph').expect(200))).toEqual([vibration.body.id])
    expect(ids(await advisor.get('/api/jobs?q=bf19krt').expect(200))).toEqual([vibration.body.id])
    expect((await advisor.get('/api/jobs?q=carys').expect(200)).body.total).toBe(3)

    const booked = await advisor.get('/api/jobs?sortBy=bookedFor').expect(200)
    // PostgreSQL puts nulls last when ascending.
    expect(ids(booked)).toEqual([oil.body.id, vibration.body.id, f.job.id])
    const byStatus = await advisor.get('/api/jobs?sortBy=status&sortDesc=false').expect(200)
    expect(byStatus.body.items.map((j: { status: string }) => j.status)).toEqual(['booked_in', 'booked_in', 'quoting'])
    const byPlate = await advisor.get('/api/jobs?sortBy=registration&sortDesc=true').expect(200)
    expect(byPlate.body.items[0].registration).toBe(f.vehicle.registration)
  })

  it('deletes a job nothing refers to', async () => {
    const { f, advisor } = await advisorOf()
    await advisor.delete(`/api/jobs/${f.job.id}`).expect(204)
    await advisor.get(`/api/jobs/${f.job.id}`).expect(404)
  })

  it('answers a bad list query with 422 on the parameter', async () => {
    const { advisor } = await advisorOf()
    const res = await advisor.get('/api/jobs?sortBy=concern&pageSize=500').expect(422)
    expect(Object.keys(issuesOf(res.body)).sort()).toEqual(['query.pageSize', 'query.sortBy'])
  })
})

describe('who may do what', () => {
  it('lets a technician read jobs and vehicles but change none, and keeps customers from them', async () => {
    const f = await makeWorkshop(t.db)
    const tech = await signIn(t.app, f.technician.email)
    expect((await tech.get('/api/jobs').expect(200)).body.total).toBe(1)
    await tech.get(`/api/jobs/${f.job.id}`).expect(200)
    await tech.get(`/api/vehicles/${f.vehicle.id}`).expect(200)

    const job = { vehicleId: f.vehicle.id, concern: 'Changed by a technician' }
    await tech.post('/api/jobs', job).expect(403)
    await tech.put(`/api/jobs/${f.job.id}`, job).expect(403)
    await tech.delete(`/api/jobs/${f.job.id}`).expect(403)
    await tech.post('/api/vehicles', { customerId: f.customer.id, registration: 'TX1', make: 'Make', model: 'Model' }).expect(403)
    await tech.post(`/api/vehicles/${f.vehicle.id}/archive`).expect(403)
    await tech.get('/api/customers').expect(403)
    await tech.get(`/api/customers/${f.customer.id}`).expect(403)

    const owner = await signIn(t.app, f.owner.email)
    expect((await owner.get(`/api/jobs/${f.job.id}`).expect(200)).body.concern).toBe('Knock on take-up of drive')
  })

  it('lets an owner do what an advisor does', async () => {
    const f = await makeWorkshop(t.db)
    const owner = await signIn(t.app, f.owner.email)
    await owner.post('/api/customers', { name: 'Owner-made Orla', phone: '07700 901000', contactByEmail: false }).expect(201)
    await owner.post(`/api/vehicles/${f.vehicle.id}/archive`).expect(200)
    await owner.post('/api/jobs', { vehicleId: f.vehicle.id, concern: 'Noise on full lock' }).expect(201)
  })
})

describe('tenancy', () => {
  it('hides another workshop’s records: 404 by id on every route, unchanged afterwards', async () => {
    const home = await makeWorkshop(t.db, 'Home')
    const away = await makeWorkshop(t.db, 'Away')
    const intruder = await signIn(t.app, away.advisor.email)
    const bodies = {
      customers: { name: 'Taken Over', email: 'taken@fixture.test' },
      vehicles: { customerId: away.customer.id, registration: 'TAKEN', make: 'Make', model: 'Model' },
      jobs: { vehicleId: away.vehicle.id, concern: 'Taken over' },
    }
    const targets = { customers: home.customer.id, vehicles: home.vehicle.id, jobs: home.job.id }

    for (const [area, id] of Object.entries(targets) as [keyof typeof targets, string][]) {
      await intruder.get(`/api/${area}/${id}`).expect(404)
      await intruder.put(`/api/${area}/${id}`, bodies[area]).expect(404)
      await intruder.delete(`/api/${area}/${id}`).expect(404)
      if (area !== 'jobs') {
        await intruder.post(`/api/${area}/${id}/archive`).expect(404)
        await intruder.post(`/api/${area}/${id}/restore`).expect(404)
      }
    }

    const owner = await signIn(t.app, home.owner.email)
    expect((await owner.get(`/api/customers/${home.customer.id}`).expect(200)).body).toMatchObject({
      name: 'Carys Customer',
      archived: false,
    })
    expect((await owner.get(`/api/vehicles/${home.vehicle.id}`).expect(200)).body).toMatchObject({
      registration: home.vehicle.registration,
      archived: false,
    })
    expect((await owner.get(`/api/jobs/${home.job.id}`).expect(200)).body.concern).toBe('Knock on take-up of drive')
  })

  it('lists and filters only the caller’s own workshop', async () => {
    const home = await makeWorkshop(t.db, 'Home')
    const away = await makeWorkshop(t.db, 'Away')
    const intruder = await signIn(t.app, away.advisor.email)
    const idsOf = async (path: string) => ((await intruder.get(path).expect(200)).body.items as { id: string }[]).map((i) => i.id)

    expect(await idsOf('/api/customers?pageSize=100')).toEqual([away.customer.id])
    expect(await idsOf('/api/vehicles?pageSize=100')).toEqual([away.vehicle.id])
    expect(await idsOf('/api/jobs?pageSize=100')).toEqual([away.job.id])
    expect(await idsOf(`/api/vehicles?customerId=${home.customer.id}`)).toEqual([])
    expect(await idsOf(`/api/jobs?vehicleId=${home.vehicle.id}`)).toEqual([])
    expect(await idsOf(`/api/jobs?technicianId=${home.technician.id}`)).toEqual([])
  })

  it('answers a malformed id with 422 on the parameter, not 500', async () => {
    const { advisor } = await advisorOf()
    for (const area of ['customers', 'vehicles', 'jobs']) {
      const res = await advisor.get(`/api/${area}/not-a-uuid`).expect(422)
      expect(Object.keys(issuesOf(res.body))).toEqual(['params.id'])
    }
  })
})
