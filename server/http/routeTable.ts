import {
  Router,
  type NextFunction,
  type Request,
  type RequestHandler,
  type Response,
} from 'express'
import type { Role } from '../../shared/constants'
import { forbidden, unauthenticated } from '../errors'

export type Method = 'get' | 'post' | 'patch' | 'put' | 'delete'

/**
 * One line of a route table. `roles` is required: a route is either open to everyone
 * ('public') or lists who may call it. The role test walks these tables.
 */
export interface RouteDef {
  method: Method
  path: string
  roles: readonly Role[] | 'public'
  /** Extra middleware (uploads, rate limits) run after the role check. */
  before?: RequestHandler[]
  handler: (req: Request, res: Response) => unknown
}

export function requireRole(roles: RouteDef['roles']): RequestHandler {
  return (req: Request, _res: Response, next: NextFunction) => {
    if (roles === 'public') return next()
    if (!req.user) return next(unauthenticated())
    if (!roles.includes(req.user.role)) return next(forbidden())
    next()
  }
}

export function buildRouter(defs: RouteDef[]): Router {
  const router = Router()
  for (const def of defs) {
    if (def.roles !== 'public' && (!Array.isArray(def.roles) || def.roles.length === 0)) {
      throw new Error(`${def.method.toUpperCase()} ${def.path} declares no roles`)
    }
    router[def.method](def.path, requireRole(def.roles), ...(def.before ?? []), def.handler)
  }
  return router
}
