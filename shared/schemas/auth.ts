import { z } from 'zod'
import { staffRoles } from '../auth/policy'

export const EmailSchema = z
  .string({ error: 'Enter an e-mail address' })
  .trim()
  .toLowerCase()
  .max(254, 'That e-mail address is too long')
  .pipe(z.email({ error: 'Enter a valid e-mail address, like name@example.com' }))

export const SignInRequestSchema = z.object({ email: EmailSchema })
export type SignInRequest = z.infer<typeof SignInRequestSchema>

export const SignInVerifySchema = z.object({ token: z.string().min(20, 'This sign-in link is incomplete').max(2000) })
export type SignInVerify = z.infer<typeof SignInVerifySchema>

export const StaffRoleSchema = z.enum(staffRoles)

export const StaffPrincipalSchema = z.object({
  kind: z.literal('staff'),
  id: z.uuid(),
  name: z.string(),
  email: z.string(),
  role: StaffRoleSchema,
  workshop: z.object({ id: z.uuid(), name: z.string(), currency: z.string(), timezone: z.string() }),
})
export type StaffPrincipal = z.infer<typeof StaffPrincipalSchema>

export const CustomerPrincipalSchema = z.object({
  kind: z.literal('customer'),
  id: z.uuid(),
  name: z.string(),
  email: z.string(),
  workshop: z.object({ id: z.uuid(), name: z.string(), currency: z.string(), timezone: z.string() }),
})
export type CustomerPrincipal = z.infer<typeof CustomerPrincipalSchema>

export const PrincipalSchema = z.discriminatedUnion('kind', [StaffPrincipalSchema, CustomerPrincipalSchema])
export type Principal = z.infer<typeof PrincipalSchema>

/** GET /api/auth/me */
export const MeResponseSchema = z.object({ user: PrincipalSchema.nullable() })
export type MeResponse = z.infer<typeof MeResponseSchema>
