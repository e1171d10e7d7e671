import { eq } from 'drizzle-orm'
import { afterAll, describe, expect, it } from 'vitest'
import { customers, jobs, staffUsers, vehicles, workshops } from '../../server/db/schema'
import { violationOf } from '../../server/lib/db-errors'
import { makeTestApp } from './helpers/app'

const t = makeTestApp()
afterAll(() => t.close())

async function newWorkshop(name = `Test Works ${Math.random().toString(36).slice(2, 8)}`) {
  const [shop] = await t.db.insert(workshops).values({ name }).returning()
  if (!shop) throw new Error('no workshop')
  return shop
}

/** The constraint PostgreSQL names when it refuses the statement. */
async function violation(promise: Promise<unknown>): Promise<string | undefined> {
  try {
    await promise
  } catch (err) {
    return violationOf(err)?.constraint ?? undefined
  }
  return undefined
}

describe('database round trip through Drizzle', () => {
  it('stores and reads back a workshop, customer, vehicle and job', async () => {
    const shop = await newWorkshop()
    const [person] = await t.db.insert(customers).values({ workshopId: shop.id, name: 'Ada Test', email: 'ada@example.test' }).returning()
    const [car] = await t.db
      .insert(vehicles)
      .values({
        workshopId: shop.id,
        customerId: person!.id,
        registration: 'AB12 CDE',
        make: 'Testmake',
        model: 'One',
        vin: '1HGBH41JXMN109186',
      })
      .returning()
    await t.db.insert(jobs).values({ workshopId: shop.id, vehicleId: car!.id, concern: 'Clunk on take-up of drive' })

    const rows = await t.db
      .select({ concern: jobs.concern, status: jobs.status, registration: vehicles.registration, customer: customers.name })
      .from(jobs)
      .innerJoin(vehicles, eq(jobs.vehicleId, vehicles.id))
      .innerJoin(customers, eq(vehicles.customerId, customers.id))
      .where(eq(jobs.workshopId, shop.id))
    expect(rows).toEqual([{ concern: 'Clunk on take-up of drive', status: 'booked_in', registration: 'AB12 CDE', customer: 'Ada Test' }])
    expect(person!.createdAt).toBeInstanceOf(Date)
  })
})

describe('constraints encode the rules', () => {
  it('refuses a VIN with the letter O (ISO 3779 excludes I, O and Q)', async () => {
    const shop = await newWorkshop()
    const [person] = await t.db.insert(customers).values({ workshopId: shop.id, name: 'Vin Test', phone: '01632 960000' }).returning()
    expect(
      await violation(
        t.db
          .insert(vehicles)
          .values({ workshopId: shop.id, customerId: person!.id, registration: 'X1', make: 'M', model: 'N', vin: '1HGBH41JXMN1O9186' }),
      ),
    ).toBe('vehicles_vin_iso3779')
  })

  it('refuses a vehicle whose customer belongs to another workshop', async () => {
    const a = await newWorkshop()
    const b = await newWorkshop()
    const [person] = await t.db.insert(customers).values({ workshopId: a.id, name: 'Cross Test', phone: '01632 960001' }).returning()
    expect(
      await violation(
        t.db.insert(vehicles).values({ workshopId: b.id, customerId: person!.id, registration: 'X2', make: 'M', model: 'N' }),
      ),
    ).toMatch(/^vehicles_workshop_id_customer_id/)
  })

  it('refuses a customer with no way to reach them', async () => {
    const shop = await newWorkshop()
    expect(await violation(t.db.insert(customers).values({ workshopId: shop.id, name: 'Nobody' }))).toBe('customers_reachable')
  })

  it('refuses two staff accounts with the same e-mail in different case', async () => {
    const shop = await newWorkshop()
    const email = `same-${Date.now()}@example.test`
    await t.db.insert(staffUsers).values({ workshopId: shop.id, name: 'One', email, role: 'advisor' })
    expect(
      await violation(t.db.insert(staffUsers).values({ workshopId: shop.id, name: 'Two', email: email.toUpperCase(), role: 'owner' })),
    ).toBe('staff_users_email_unique')
  })
})
