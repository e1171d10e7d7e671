import type { StaffRole } from '@shared/auth/policy'
import type { InviteStaff, StaffMember } from '@shared/schemas/staff'
import { request } from './http'

export async function listStaff(): Promise<StaffMember[]> {
  const { items } = await request<{ items: StaffMember[] }>('GET', '/staff')
  return items
}

/** Also e-mails the new member a sign-in link; rejects with code `email_taken` (409) for an address already in use. */
export function inviteStaff(input: InviteStaff): Promise<StaffMember> {
  return request<StaffMember>('POST', '/staff', { body: input })
}

/** Rejects with code `last_owner` (409) when this would leave the workshop without an active owner. */
export function changeStaffRole(id: string, role: StaffRole): Promise<StaffMember> {
  return request<StaffMember>('PATCH', `/staff/${encodeURIComponent(id)}/role`, { body: { role } })
}

/** Ends their sessions at once; rejects with code `self_deactivation` or `last_owner` (409). */
export function deactivateStaff(id: string): Promise<StaffMember> {
  return request<StaffMember>('POST', `/staff/${encodeURIComponent(id)}/deactivate`)
}

export function reactivateStaff(id: string): Promise<StaffMember> {
  return request<StaffMember>('POST', `/staff/${encodeURIComponent(id)}/reactivate`)
}
