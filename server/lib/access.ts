import type { Permission } from '../../shared/auth/policy'

/**
 * Who may call a route. Declared with the route in the RouteTable and enforced by the guard in
 * middleware/auth.ts; apart from both so neither imports the other.
 */
export type Access = { kind: 'public' } | { kind: 'signed-in' } | { kind: 'staff'; permission: Permission } | { kind: 'customer' }

export const anyone: Access = { kind: 'public' }
export const signedIn: Access = { kind: 'signed-in' }
export const customerOnly: Access = { kind: 'customer' }
export const staffWith = (permission: Permission): Access => ({ kind: 'staff', permission })
