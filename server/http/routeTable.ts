import {
  Router,
  type NextFunction,
  type Request,
  type RequestHandler,
  type Response,
} from 'express'
import type { z } from 'zod'
import type { Role } from '../../shared/constants'
import { AppError, forbidden, unauthenticated } from '../errors'
import { withInput } from './validate'
import type { SessionRule } from './sessionAccess'

export type Method = 'get' | 'post' | 'patch' | 'put' | 'delete'

/** The parts of a request a route may declare a schema for, in the order they are checked. */
export const INPUT_PARTS = ['params', 'headers', 'query', 'body'] as const
export type InputPart = (typeof INPUT_PARTS)[number]

/** A part's schema, or nothing when the route does not read that part. */
export type PartSchema = z.ZodType | undefined
type Parsed<S extends PartSchema> = S extends z.ZodType ? z.output<S> : undefined

/** What a handler receives: each declared part as its schema's output, the others undefined. */
export interface RouteInput<
  P extends PartSchema = PartSchema,
  Q extends PartSchema = PartSchema,
  B extends PartSchema = PartSchema,
  H extends PartSchema = PartSchema,
> {
  params: Parsed<P>
  query: Parsed<Q>
  body: Parsed<B>
  headers: Parsed<H>
}

/**
 * The error a route answers with instead of the 422 when one part fails its schema. It may also
 * release what `before` took (an upload's temp files), since the handler will not run.
 */
export type OnInvalid = (failure: AppError, req: Request, res: Response) => Error

export interface RouteSpec<
  P extends PartSchema,
  Q extends PartSchema,
  B extends PartSchema,
  H extends PartSchema = undefined,
> {
  method: Method
  path: string
  roles: readonly Role[] | 'public'
  /**
   * For routes on one session (`:id` names it, or one of its invitations): what the caller may
   * do with it, checked by the one ownership rule in sessionAccess.ts right after the role.
   */
  session?: SessionRule
  /**
   * The body a write takes: JSON (the default) or a multipart upload. Any other content type
   * is a 415, so a form posted from another site is refused even before its origin is looked at.
   */
  accepts?: 'json' | 'multipart'
  /** Extra middleware (uploads, rate limits) run after the role check and before validation. */
  before?: RequestHandler[]
  params?: P
  /**
   * Request headers (lower-case names) a route reads as input: credentials that must stay out
   * of URLs, and so out of every log and browser history, travel here.
   */
  headers?: H
  query?: Q
  body?: B
  onInvalid?: Partial<Record<InputPart, OnInvalid>>
  handler: (req: Request, res: Response, input: RouteInput<P, Q, B, H>) => unknown
}

/**
 * One line of a route table. `roles` is required: a route is either open to everyone
 * ('public') or lists who may call it. The role test walks these tables and their schemas.
 */
export type RouteDef = RouteSpec<PartSchema, PartSchema, PartSchema, PartSchema>

/** A route table entry whose handler gets its declared input parsed and typed. */
export function route<
  P extends PartSchema = undefined,
  Q extends PartSchema = undefined,
  B extends PartSchema = undefined,
  H extends PartSchema = undefined,
>(spec: RouteSpec<P, Q, B, H>): RouteDef {
  // The validate step hands the handler exactly what these schemas produced, so the
  // narrower handler type holds at run time.
  return spec as unknown as RouteDef
}

const BODY_TYPES = { json: 'application/json', multipart: 'multipart/form-data' } as const

/** Refuses a write whose body is not the content type the route takes; bodyless writes pass. */
export function requireContentType(accepts: 'json' | 'multipart'): RequestHandler {
  const type = BODY_TYPES[accepts]
  return (req, _res, next) => {
    // A body is there when it has a length above zero or comes chunked (RFC 9112 §6.3).
    const length = req.headers['content-length']
    const hasBody =
      req.headers['transfer-encoding'] !== undefined || (length !== undefined && length !== '0')
    if (req.method === 'GET' || req.method === 'HEAD' || !hasBody) return next()
    if (req.is(type)) return next()
    next(new AppError('unsupported_media_type', `Send this request's body as ${type}`))
  }
}

export function requireRole(roles: RouteDef['roles']): RequestHandler {
  return (req: Request, _res: Response, next: NextFunction) => {
    if (roles === 'public') return next()
    if (!req.user) return next(unauthenticated())
    if (!roles.includes(req.user.role)) return next(forbidden())
    next()
  }
}

/**
 * Role check, then the session rule, then `before`, then the validate step and the handler in
 * one synchronous call.
 */
export function buildRouter(
  defs: RouteDef[],
  sessionGuard?: (rule: SessionRule) => RequestHandler,
): Router {
  const router = Router()
  for (const def of defs) {
    const name = `${def.method.toUpperCase()} ${def.path}`
    if (def.roles !== 'public' && (!Array.isArray(def.roles) || def.roles.length === 0)) {
      throw new Error(`${name} declares no roles`)
    }
    if (def.session && (!sessionGuard || def.roles === 'public' || !def.path.includes(':id')))
      throw new Error(`${name}: a session rule needs staff roles, an :id and the guard`)
    const guard = def.session ? [sessionGuard!(def.session)] : []
    router[def.method](
      def.path,
      requireRole(def.roles),
      ...guard,
      requireContentType(def.accepts ?? 'json'),
      ...(def.before ?? []),
      withInput(def),
    )
  }
  return router
}
