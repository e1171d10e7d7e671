import { type RequestHandler, Router } from 'express'
import { guard } from '../middleware/auth'
import type { Access } from './access'

type Method = 'get' | 'post' | 'put' | 'patch' | 'delete'

export interface RouteRule {
  method: Method
  /** The full path under /api, in Express's syntax (`/staff/:id`). */
  path: string
  /** The path inside its group's router, as Express stores it. */
  localPath: string
  access: Access
}

/**
 * Every API route is declared through this table with the rule that guards it, so the access
 * matrix test can walk all routes and a route without a rule cannot exist.
 */
export class RouteTable {
  readonly rules: RouteRule[] = []

  group(base: string) {
    const router = Router()
    const add =
      (method: Method) =>
      (path: string, access: Access, ...handlers: (RequestHandler | RequestHandler[])[]) => {
        this.rules.push({ method, path: base + path, localPath: path, access })
        router[method](path, guard(access), ...handlers.flat())
      }
    return { base, router, get: add('get'), post: add('post'), put: add('put'), patch: add('patch'), delete: add('delete') }
  }
}

export type RouteGroup = ReturnType<RouteTable['group']>
