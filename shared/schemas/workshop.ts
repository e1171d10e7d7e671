import { z } from 'zod'
import { optionalText } from './common'

/** Time zones the runtime knows; checked the same way in the browser and on the server. */
function isTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: tz })
    return true
  } catch {
    return false
  }
}

export const WorkshopSettingsSchema = z.object({
  name: z.string().trim().min(1, 'Enter the workshop name').max(120),
  addressLines: z.array(z.string().trim().min(1).max(120)).max(5, 'At most 5 address lines'),
  postcode: optionalText(20),
  phone: optionalText(40),
  email: z
    .union([z.literal(''), z.email({ error: 'Enter a valid e-mail address' })])
    .transform((v) => (v === '' ? null : v))
    .nullable()
    .optional(),
  // UK VAT registration numbers are GB followed by 9 digits (or 12 for branch traders); other formats are allowed for non-UK shops.
  vatNumber: optionalText(20),
  currency: z.string().regex(/^[A-Z]{3}$/, 'Use a three-letter ISO 4217 code, like GBP'),
  timezone: z.string().refine(isTimeZone, 'Not a time zone this system knows, e.g. Europe/London'),
})
export type WorkshopSettings = z.infer<typeof WorkshopSettingsSchema>

export const WorkshopSchema = WorkshopSettingsSchema.extend({ id: z.uuid() })
export type Workshop = z.infer<typeof WorkshopSchema>
