import type { AppContext } from '../context'
import { STAFF } from '../../shared/constants'
import { route, type RouteDef } from '../http/routeTable'
import { plannerNumbers } from './service'
import { plannerQuery } from '../../shared/schemas/sessions'

export function plannerRoutes(ctx: AppContext): RouteDef[] {
  return [
    route({
      method: 'get',
      path: '/',
      roles: STAFF,
      query: plannerQuery,
      handler: async (_req, res, { query }) => {
        res.json(await plannerNumbers(ctx.knex, query))
      },
    }),
  ]
}
