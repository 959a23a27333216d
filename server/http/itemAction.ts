import type { Role } from '../../shared/constants'
import { idParam } from '../../shared/schemas/common'
import type { Actor } from '../audit/service'
import { actorOf } from './authenticate'
import { route, type RouteDef } from './routeTable'

/**
 * A staff action on the item named by `:id` (open, close, archive, restore, delete): it runs
 * as the signed-in user and answers the result under `key`, or as it is without one.
 */
export function itemAction(def: {
  method: 'post' | 'delete'
  path: string
  roles: readonly Role[]
  key?: string
  act: (id: number, actor: Actor) => Promise<unknown>
}): RouteDef {
  return route({
    method: def.method,
    path: def.path,
    roles: def.roles,
    params: idParam,
    handler: async (req, res, { params }) => {
      const result = await def.act(params.id, actorOf(req))
      res.json(def.key ? { [def.key]: result } : result)
    },
  })
}
