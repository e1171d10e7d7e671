import { z } from 'zod'
import { EmailSchema } from './auth'
import { listQuerySchema, optionalText } from './common'

/** ISO 3779: 17 characters; the letters I, O and Q are never used (they look like 1 and 0). */
export const VIN_PATTERN = /^[A-HJ-NPR-Z0-9]{17}$/

export const VinSchema = z
  .string()
  .trim()
  .toUpperCase()
  .refine((v) => v.length === 17, 'A VIN has exactly 17 characters')
  .refine((v) => !/[IOQ]/.test(v), 'A VIN never contains the letters I, O or Q (ISO 3779)')
  // Only about other characters: a wrong length or an I, O or Q has its own message above.
  .refine((v) => /^[A-Z0-9]*$/.test(v), 'A VIN has only letters and digits')

const optionalEmail = z
  .union([z.literal(''), EmailSchema])
  .transform((v) => (v === '' ? null : v))
  .nullable()
  .optional()

export const CustomerInputSchema = z
  .object({
    name: z.string({ error: 'Enter the customer’s name' }).trim().min(1, 'Enter the customer’s name').max(120, 'At most 120 characters'),
    email: optionalEmail,
    phone: optionalText(40),
    addressLines: z.array(z.string().trim().min(1).max(120)).max(5, 'At most 5 address lines').default([]),
    postcode: optionalText(20),
    contactByEmail: z.boolean().default(true),
    contactByPhone: z.boolean().default(false),
    contactBySms: z.boolean().default(false),
  })
  .superRefine((c, ctx) => {
    if (!c.email && !c.phone) ctx.addIssue({ code: 'custom', path: ['email'], message: 'Enter an e-mail address or a phone number' })
    if (c.contactByEmail && !c.email)
      ctx.addIssue({ code: 'custom', path: ['contactByEmail'], message: 'Add an e-mail address to contact them by e-mail' })
    if ((c.contactByPhone || c.contactBySms) && !c.phone)
      ctx.addIssue({ code: 'custom', path: ['phone'], message: 'Add a phone number to contact them by phone or text' })
  })
export type CustomerInput = z.infer<typeof CustomerInputSchema>

export const CustomerSchema = z.object({
  id: z.uuid(),
  name: z.string(),
  email: z.string().nullable(),
  phone: z.string().nullable(),
  addressLines: z.array(z.string()),
  postcode: z.string().nullable(),
  contactByEmail: z.boolean(),
  contactByPhone: z.boolean(),
  contactBySms: z.boolean(),
  archived: z.boolean(),
  vehicleCount: z.number().int().optional(),
  createdAt: z.string(),
})
export type Customer = z.infer<typeof CustomerSchema>

export const CustomerListQuerySchema = listQuerySchema(['name', 'createdAt'] as const).extend({
  archived: z
    .enum(['true', 'false'])
    .transform((v) => v === 'true')
    .optional(),
})
export type CustomerListQuery = z.infer<typeof CustomerListQuerySchema>

const thisYear = new Date().getFullYear()

export const VehicleInputSchema = z.object({
  customerId: z.uuid({ error: 'Choose the vehicle’s keeper' }),
  registration: z
    .string({ error: 'Enter the registration' })
    .trim()
    .toUpperCase()
    .min(1, 'Enter the registration')
    .max(16, 'That registration is too long'),
  vin: z
    .union([z.literal(''), VinSchema])
    .transform((v) => (v === '' ? null : v))
    .nullable()
    .optional(),
  make: z.string({ error: 'Enter the make' }).trim().min(1, 'Enter the make').max(60, 'At most 60 characters'),
  model: z.string({ error: 'Enter the model' }).trim().min(1, 'Enter the model').max(80, 'At most 80 characters'),
  year: z.coerce
    .number({ error: 'Enter a year like 2014' })
    .int('Enter a year like 2014')
    .min(1886, 'Cars were not made before 1886')
    .max(thisYear + 1, `Not later than ${thisYear + 1}`)
    .nullable()
    .optional(),
  odometer: z.coerce
    .number({ error: 'Enter the reading in figures' })
    .int('Whole miles or kilometres only')
    .min(0, 'Cannot be negative')
    .max(5_000_000, 'That reading is too high')
    .nullable()
    .optional(),
  odometerUnit: z.enum(['mi', 'km']).default('mi'),
  vehicleGroup: optionalText(60),
})
export type VehicleInput = z.infer<typeof VehicleInputSchema>

export const VehicleSchema = z.object({
  id: z.uuid(),
  customerId: z.uuid(),
  customerName: z.string(),
  registration: z.string(),
  vin: z.string().nullable(),
  make: z.string(),
  model: z.string(),
  year: z.number().nullable(),
  odometer: z.number().nullable(),
  odometerUnit: z.enum(['mi', 'km']),
  vehicleGroup: z.string().nullable(),
  archived: z.boolean(),
  createdAt: z.string(),
})
export type Vehicle = z.infer<typeof VehicleSchema>

export const VehicleListQuerySchema = listQuerySchema(['registration', 'make', 'createdAt'] as const).extend({
  customerId: z.uuid().optional(),
  archived: z
    .enum(['true', 'false'])
    .transform((v) => v === 'true')
    .optional(),
})
export type VehicleListQuery = z.infer<typeof VehicleListQuerySchema>

export const jobStatuses = ['booked_in', 'inspecting', 'quoting', 'waiting_for_customer', 'in_work', 'finished', 'cancelled'] as const
export const JobStatusSchema = z.enum(jobStatuses)
export type JobStatus = z.infer<typeof JobStatusSchema>
export const jobStatusLabels: Record<JobStatus, string> = {
  booked_in: 'Booked in',
  inspecting: 'Being inspected',
  quoting: 'Estimate being written',
  waiting_for_customer: 'Waiting for the customer',
  in_work: 'Work under way',
  finished: 'Finished',
  cancelled: 'Cancelled',
}

/**
 * The moves a job's status may make, by hand on the job page or by what happens to it (an inspection
 * starts, an estimate is sent, a deposit is paid). Forward by any number of steps; back only where
 * the work really goes back (an estimate withdrawn, extra work found, a finished job reopened, a
 * cancelled one reinstated). Staying put is always allowed. This table is the one definition: the
 * server refuses every other move, and the job form offers only these.
 */
export const jobTransitions: Record<JobStatus, readonly JobStatus[]> = {
  booked_in: ['inspecting', 'quoting', 'waiting_for_customer', 'in_work', 'finished', 'cancelled'],
  inspecting: ['booked_in', 'quoting', 'waiting_for_customer', 'in_work', 'finished', 'cancelled'],
  quoting: ['inspecting', 'waiting_for_customer', 'in_work', 'finished', 'cancelled'],
  waiting_for_customer: ['quoting', 'in_work', 'finished', 'cancelled'],
  in_work: ['waiting_for_customer', 'finished', 'cancelled'],
  finished: ['in_work'],
  cancelled: ['booked_in'],
}

export function canMoveJob(from: JobStatus, to: JobStatus): boolean {
  return from === to || jobTransitions[from].includes(to)
}

const isoDate = z
  .union([z.literal(''), z.iso.date({ error: 'Use a date like 2026-12-02' })])
  .transform((v) => (v === '' ? null : v))
  .nullable()
  .optional()

export const JobInputSchema = z
  .object({
    vehicleId: z.uuid({ error: 'Choose the vehicle' }),
    concern: z
      .string({ error: 'Write down the customer’s concern in their words' })
      .trim()
      .min(1, 'Write down the customer’s concern in their words')
      .max(2000, 'At most 2000 characters'),
    status: JobStatusSchema.default('booked_in'),
    technicianId: z.uuid().nullable().optional(),
    bookedFor: isoDate,
    promisedFor: isoDate,
  })
  .superRefine((j, ctx) => {
    if (j.bookedFor && j.promisedFor && j.promisedFor < j.bookedFor) {
      ctx.addIssue({ code: 'custom', path: ['promisedFor'], message: 'The promised date cannot be before the booking date' })
    }
  })
export type JobInput = z.infer<typeof JobInputSchema>

export const JobSchema = z.object({
  id: z.uuid(),
  vehicleId: z.uuid(),
  registration: z.string(),
  vehicleDescription: z.string(),
  customerId: z.uuid(),
  customerName: z.string(),
  concern: z.string(),
  status: JobStatusSchema,
  technicianId: z.uuid().nullable(),
  technicianName: z.string().nullable(),
  bookedFor: z.string().nullable(),
  promisedFor: z.string().nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
})
export type Job = z.infer<typeof JobSchema>

export const JobListQuerySchema = listQuerySchema(['createdAt', 'status', 'registration', 'bookedFor'] as const).extend({
  status: JobStatusSchema.optional(),
  technicianId: z.uuid().optional(),
  vehicleId: z.uuid().optional(),
})
export type JobListQuery = z.infer<typeof JobListQuerySchema>
