import type { StaffRole } from '../../shared/auth/policy'

declare global {
  namespace Express {
    /**
     * The signed-in staff member or customer (shared/schemas/auth Principal), loaded fresh from the
     * database on every request. Narrow with staffOf()/customerOf() from middleware/auth.
     */
    interface User {
      kind: 'staff' | 'customer'
      id: string
      name: string
      email: string
      role?: StaffRole
      workshop: { id: string; name: string; currency: string; timezone: string }
    }
  }
}

declare module 'express-session' {
  interface SessionData {
    /** When the user signed in (ms since epoch): the absolute session lifetime counts from here. */
    signedInAt?: number
    /** Fallback CSRF token for clients that send neither Sec-Fetch-Site nor Origin. */
    csrfToken?: string
  }
}

export {}
