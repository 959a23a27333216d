import type { z } from 'zod'
import type { Role } from '../../shared/constants'
import { idParam } from '../../shared/schemas/common'
import type { Actor } from '../audit/service'
import { actorOf } from './authenticate'
import { route, type RouteDef } from './routeTable'
import type { SessionRule } from './sessionAccess'

// The shapes most staff routes take, so a route table reads as a list of what each route does:
// list, read, create, update, and actions on the item named by `:id`. Each answers its result
// under `key` (`{ recipe: … }`), as the client's typed API expects.

type Roles = readonly Role[]

/** GET a list, filtered by the declared query. */
export function listItems<Q extends z.ZodType | undefined = undefined>(def: {
  path: string
  roles: Roles
  key: string
  query?: Q
  list: (query: Q extends z.ZodType ? z.output<Q> : undefined) => Promise<unknown>
}): RouteDef {
  return route({
    method: 'get',
    path: def.path,
    roles: def.roles,
    query: def.query as z.ZodType | undefined,
    handler: async (_req, res, { query }) => {
      res.json({ [def.key]: await def.list(query as never) })
    },
  })
}

/** GET one item by `:id`. */
export function readItem(def: {
  path: string
  roles: Roles
  key: string
  read: (id: number) => Promise<unknown>
}): RouteDef {
  return route({
    method: 'get',
    path: def.path,
    roles: def.roles,
    params: idParam,
    handler: async (_req, res, { params }) => {
      res.json({ [def.key]: await def.read(params.id) })
    },
  })
}

/** POST a new item from the declared body; 201. */
export function createItem<B extends z.ZodType>(def: {
  path: string
  roles: Roles
  key: string
  body: B
  create: (body: z.output<B>, actor: Actor) => Promise<unknown>
}): RouteDef {
  return route({
    method: 'post',
    path: def.path,
    roles: def.roles,
    body: def.body as z.ZodType,
    handler: async (req, res, { body }) => {
      res.status(201).json({ [def.key]: await def.create(body as z.output<B>, actorOf(req)) })
    },
  })
}

/** PATCH the item named by `:id` with the declared body. */
export function updateItem<B extends z.ZodType>(def: {
  path: string
  roles: Roles
  key: string
  body: B
  session?: SessionRule
  update: (id: number, body: z.output<B>, actor: Actor) => Promise<unknown>
}): RouteDef {
  return route({
    method: 'patch',
    path: def.path,
    roles: def.roles,
    session: def.session,
    params: idParam,
    body: def.body as z.ZodType,
    handler: async (req, res, { params, body }) => {
      res.json({ [def.key]: await def.update(params.id, body as z.output<B>, actorOf(req)) })
    },
  })
}

/**
 * A staff action on the item named by `:id` (open, close, archive, restore, delete): it runs
 * as the signed-in user and answers the result under `key`, or as it is without one.
 */
export function itemAction(def: {
  method: 'post' | 'delete'
  path: string
  roles: Roles
  key?: string
  session?: SessionRule
  act: (id: number, actor: Actor) => Promise<unknown>
}): RouteDef {
  return route({
    method: def.method,
    path: def.path,
    roles: def.roles,
    session: def.session,
    params: idParam,
    handler: async (req, res, { params }) => {
      const result = await def.act(params.id, actorOf(req))
      res.json(def.key ? { [def.key]: result } : result)
    },
  })
}
