import type { Page } from '@shared/schemas/common'
import type { Customer, Job, Vehicle } from '@shared/schemas/records'
import { testWorkshop } from './principals'

/** Invented records for client tests; names, plates and VINs describe nothing real. */
export const testIds = {
  customer: '4fb19e96-5072-43a4-9ebf-60a1b2c34d55',
  otherCustomer: '50c2af07-6183-44b5-8fc0-71b2c3d45e66',
  vehicle: '61d3b018-7294-45c6-90d1-82c3d4e56f77',
  job: '72e4c129-83a5-46d7-a1e2-93d4e5f67088',
}

export { testWorkshop }

export function customer(overrides: Partial<Customer> = {}): Customer {
  return {
    id: testIds.customer,
    name: 'Maris Fenwick',
    email: 'maris@fenwick.test',
    phone: '07700 900123',
    addressLines: ['2 Scree Lane', 'Hollowmere'],
    postcode: 'HM2 4SL',
    contactByEmail: true,
    contactByPhone: false,
    contactBySms: false,
    archived: false,
    vehicleCount: 1,
    createdAt: '2025-03-04T10:00:00.000Z',
    ...overrides,
  }
}

export function vehicle(overrides: Partial<Vehicle> = {}): Vehicle {
  return {
    id: testIds.vehicle,
    customerId: testIds.customer,
    customerName: 'Maris Fenwick',
    registration: 'HM15 KNX',
    vin: 'HLW4X4TST00000042',
    make: 'Brackwater',
    model: 'Ridgeline 110',
    year: 2015,
    odometer: 98_000,
    odometerUnit: 'mi',
    vehicleGroup: 'coil-sprung-live-axle',
    archived: false,
    createdAt: '2025-03-04T10:05:00.000Z',
    ...overrides,
  }
}

export function job(overrides: Partial<Job> = {}): Job {
  return {
    id: testIds.job,
    vehicleId: testIds.vehicle,
    registration: 'HM15 KNX',
    vehicleDescription: 'Brackwater Ridgeline 110',
    customerId: testIds.customer,
    customerName: 'Maris Fenwick',
    concern: 'Clunk from the back when pulling away',
    status: 'booked_in',
    technicianId: null,
    technicianName: null,
    bookedFor: '2025-03-10',
    promisedFor: null,
    createdAt: '2025-03-04T10:10:00.000Z',
    updatedAt: '2025-03-04T10:10:00.000Z',
    ...overrides,
  }
}

export function page<T>(items: T[], total = items.length, at = 1, size = 25): Page<T> {
  return { items, total, page: at, pageSize: size }
}

/** A promise the test settles when it chooses, to order answers that overlap. */
export function deferred<T>() {
  let resolve!: (value: T) => void
  let reject!: (reason: unknown) => void
  const promise = new Promise<T>((res, rej) => {
    resolve = res
    reject = rej
  })
  return { promise, resolve, reject }
}
