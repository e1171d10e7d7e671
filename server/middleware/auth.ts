import type { RequestHandler } from 'express'
import { can } from '../../shared/auth/policy'
import type { CustomerPrincipal, StaffPrincipal } from '../../shared/schemas/auth'
import { ForbiddenError, UnauthorizedError } from '../lib/errors'
import type { Access } from '../lib/access'

/** The server decides: every route passes through the guard for its declared access rule. */
export function guard(access: Access): RequestHandler {
  return (req, _res, next) => {
    if (access.kind === 'public') return next()
    const user = req.user
    if (!user) return next(new UnauthorizedError())
    if (access.kind === 'signed-in') return next()
    if (access.kind === 'customer') {
      return next(user.kind === 'customer' ? undefined : new ForbiddenError('This page is for customers.'))
    }
    if (user.kind !== 'staff') return next(new ForbiddenError('This is for workshop staff.'))
    if (!can(user.role, access.permission)) return next(new ForbiddenError('Your role does not allow this.'))
    next()
  }
}

/** The signed-in staff member; only call behind a staff guard. */
export function staffOf(req: { user?: Express.User }): StaffPrincipal {
  const user = req.user
  if (!user || user.kind !== 'staff' || !user.role) throw new UnauthorizedError()
  return user as StaffPrincipal
}

export function customerOf(req: { user?: Express.User }): CustomerPrincipal {
  const user = req.user
  if (!user || user.kind !== 'customer') throw new UnauthorizedError()
  return user as CustomerPrincipal
}
