import type { StaffRole } from '@shared/auth/policy'
import type { CustomerPrincipal, StaffPrincipal } from '@shared/schemas/auth'

/** Invented people and an invented workshop for client tests; no value here is a fact about anything real. */
export const testWorkshop = {
  id: '6f1c2d3e-4a5b-4c6d-8e7f-101112131415',
  name: 'Hollowmere 4x4',
  currency: 'GBP',
  timezone: 'Europe/London',
}

const staffIds: Record<StaffRole, string> = {
  owner: '0b7d5a52-1c3e-4f60-9a7b-2c4d6e8f0a11',
  advisor: '1c8e6b63-2d4f-4071-8b8c-3d5e7f901b22',
  technician: '2d9f7c74-3e50-4182-9c9d-4e6f80a12c33',
}

const staffNames: Record<StaffRole, string> = {
  owner: 'Wren Castell',
  advisor: 'Ola Brandt',
  technician: 'Pim Sayer',
}

export function staffPrincipal(role: StaffRole): StaffPrincipal {
  return {
    kind: 'staff',
    id: staffIds[role],
    name: staffNames[role],
    email: `${role}@hollowmere.test`,
    role,
    workshop: testWorkshop,
  }
}

export const customerPrincipal: CustomerPrincipal = {
  kind: 'customer',
  id: '3ea08d85-4f61-4293-8dae-5f7091b23d44',
  name: 'Juno Treadwell',
  email: 'juno@example.test',
  workshop: testWorkshop,
}
