import { z } from 'zod'
import { EmailSchema, StaffRoleSchema } from './auth'

export const StaffMemberSchema = z.object({
  id: z.uuid(),
  name: z.string(),
  email: z.string(),
  role: StaffRoleSchema,
  active: z.boolean(),
  lastSignInAt: z.string().nullable(),
  createdAt: z.string(),
})
export type StaffMember = z.infer<typeof StaffMemberSchema>

export const InviteStaffSchema = z.object({
  name: z.string().trim().min(1, 'Enter their name').max(120),
  email: EmailSchema,
  role: StaffRoleSchema,
})
export type InviteStaff = z.infer<typeof InviteStaffSchema>

export const ChangeRoleSchema = z.object({ role: StaffRoleSchema })
export type ChangeRole = z.infer<typeof ChangeRoleSchema>
