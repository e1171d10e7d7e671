/**
 * Who may do what. The server guards every route with these permissions; the client reads the same
 * table only to hide what a role cannot do.
 */
export const staffRoles = ['owner', 'advisor', 'technician'] as const
export type StaffRole = (typeof staffRoles)[number]

export const permissions = [
  'workshop:read',
  'settings:manage',
  'staff:read',
  'staff:manage',
  'audit:read',
  'customers:read',
  'customers:write',
  'vehicles:read',
  'vehicles:write',
  'jobs:read',
  'jobs:write',
  'inspections:write',
  'findings:write',
  'estimates:read',
  'estimates:write',
  'catalogue:manage',
] as const
export type Permission = (typeof permissions)[number]

const advisorPermissions: Permission[] = [
  'workshop:read',
  'staff:read',
  'customers:read',
  'customers:write',
  'vehicles:read',
  'vehicles:write',
  'jobs:read',
  'jobs:write',
  'findings:write',
  'estimates:read',
  'estimates:write',
]

export const rolePermissions: Record<StaffRole, ReadonlySet<Permission>> = {
  owner: new Set(permissions),
  advisor: new Set(advisorPermissions),
  technician: new Set<Permission>(['workshop:read', 'staff:read', 'vehicles:read', 'jobs:read', 'inspections:write', 'findings:write']),
}

export function can(role: StaffRole | undefined | null, permission: Permission): boolean {
  return role ? rolePermissions[role].has(permission) : false
}

export const roleLabels: Record<StaffRole, string> = {
  owner: 'Owner',
  advisor: 'Service advisor',
  technician: 'Technician',
}
