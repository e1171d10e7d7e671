/**
 * Demo data: an invented workshop, people and vehicles. Every name, number and address here is
 * made up for the demo (fictional makes, `.test` e-mail domains) and is never used as a truth in tests.
 */
import { pathToFileURL } from 'node:url'
import { count } from 'drizzle-orm'
import { drizzle } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import * as schema from './schema'
import type { Database } from './client'
import { seedCatalogue } from './seed-catalogue'
import { starterTemplate } from '../../shared/inspection/starter-template'

type Db = Database

export const demo = {
  workshop: {
    name: 'Brackenfold 4x4 Works',
    addressLines: ['Unit 4, Tannery Yard', 'Brackenfold'],
    postcode: 'BF1 4XW',
    phone: '01632 960412',
    email: 'desk@brackenfold4x4.test',
    vatNumber: 'GB000000000',
  },
  owner: { name: 'Morwenna Pryce', email: 'owner@brackenfold4x4.test', role: 'owner' as const },
  advisor: { name: 'Dev Ashworth', email: 'advisor@brackenfold4x4.test', role: 'advisor' as const },
  technician: { name: 'Kit Hollins', email: 'tech@brackenfold4x4.test', role: 'technician' as const },
  otherWorkshop: { name: 'Scarrow Off-Road Garage', addressLines: ['2 Mill Lane', 'Scarrow'], postcode: 'SC2 7QP' },
  otherOwner: { name: 'Ilse Brennan', email: 'owner@scarrow-offroad.test', role: 'owner' as const },
}

/** Seeds only an empty database, so a second start keeps whatever the demo user changed. */
export async function seedDemo(db: Db): Promise<'seeded' | 'kept'> {
  const [existing] = await db.select({ n: count() }).from(schema.workshops)
  if ((existing?.n ?? 0) > 0) return 'kept'

  await db.transaction(async (tx) => {
    const [shop] = await tx.insert(schema.workshops).values(demo.workshop).returning()
    if (!shop) throw new Error('workshop insert returned nothing')
    await tx.insert(schema.checkTemplates).values({ workshopId: shop.id, ...starterTemplate })
    const staff = await tx
      .insert(schema.staffUsers)
      .values([demo.owner, demo.advisor, demo.technician].map((s) => ({ ...s, workshopId: shop.id })))
      .returning()
    const tech = staff.find((s) => s.role === 'technician')

    const people = await tx
      .insert(schema.customers)
      .values([
        {
          workshopId: shop.id,
          name: 'Rhian Calloway',
          email: 'rhian.calloway@example.test',
          phone: '07700 900311',
          addressLines: ['Hollin Cottage', 'Upper Skell'],
          postcode: 'BF3 2LR',
        },
        {
          workshopId: shop.id,
          name: 'Tomasz Wren',
          email: 'tomasz.wren@example.test',
          phone: '07700 900527',
          addressLines: ['14 Quarry Row', 'Brackenfold'],
          postcode: 'BF1 9DD',
        },
        {
          workshopId: shop.id,
          name: 'Harriet Oduya',
          email: 'harriet.oduya@example.test',
          phone: '07700 900864',
          addressLines: ['Low Gill Farm', 'Marrick End'],
          postcode: 'BF6 1AG',
          contactByPhone: true,
        },
      ])
      .returning()
    const [rhian, tomasz, harriet] = people
    if (!rhian || !tomasz || !harriet) throw new Error('customer insert returned too few rows')

    const cars = await tx
      .insert(schema.vehicles)
      .values([
        {
          workshopId: shop.id,
          customerId: rhian.id,
          registration: 'BF19 KRT',
          vin: 'SKF4X4DEM10000017',
          make: 'Corrin',
          model: 'Stag 110',
          year: 2014,
          odometer: 118_400,
          vehicleGroup: 'coil-sprung-live-axle',
        },
        {
          workshopId: shop.id,
          customerId: tomasz.id,
          registration: 'WN08 PLB',
          vin: 'HRL4X4DEM20000025',
          make: 'Harlow',
          model: 'Trailmaster LWB',
          year: 2008,
          odometer: 161_250,
          vehicleGroup: 'leaf-sprung-pickup',
        },
        {
          workshopId: shop.id,
          customerId: harriet.id,
          registration: 'YM66 GTA',
          make: 'Ridgeback',
          model: 'Fellrunner 3.0',
          year: 2016,
          odometer: 92_030,
          vehicleGroup: 'coil-sprung-live-axle',
        },
      ])
      .returning()
    const [stag, trailmaster, fellrunner] = cars
    if (!stag || !trailmaster || !fellrunner) throw new Error('vehicle insert returned too few rows')

    await tx.insert(schema.jobs).values([
      {
        workshopId: shop.id,
        vehicleId: stag.id,
        concern: 'Knock from the front when pulling away, worse on full lock.',
        status: 'inspecting',
        technicianId: tech?.id,
      },
      { workshopId: shop.id, vehicleId: trailmaster.id, concern: 'Vibration through the floor above 50 mph.', status: 'booked_in' },
      {
        workshopId: shop.id,
        vehicleId: fellrunner.id,
        concern: 'Oil on the inside of the front wheels after green-laning.',
        status: 'booked_in',
      },
    ])
    // Labour times, access steps, parts and pricing: all invented demo figures (see seed-catalogue.ts).
    await seedCatalogue(tx, shop.id, { technicianId: tech?.id })

    const [other] = await tx.insert(schema.workshops).values(demo.otherWorkshop).returning()
    if (!other) throw new Error('second workshop insert returned nothing')
    await tx.insert(schema.staffUsers).values({ ...demo.otherOwner, workshopId: other.id })
    await tx.insert(schema.checkTemplates).values({ workshopId: other.id, ...starterTemplate })
  })
  return 'seeded'
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const url = process.env.DATABASE_URL
  if (!url) {
    console.error('DATABASE_URL is not set')
    process.exit(1)
  }
  const pool = new pg.Pool({ connectionString: url, max: 1 })
  const result = await seedDemo(drizzle(pool, { schema, casing: 'snake_case' }))
  console.log(result === 'seeded' ? 'demo workshop seeded' : 'database already has data; demo seed skipped')
  await pool.end()
}
