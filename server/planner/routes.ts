import type { AppContext } from '../context'
import { STAFF } from '../../shared/constants'
import type { RouteDef } from '../http/routeTable'
import { parse } from '../http/validate'
import { plannerNumbers } from './service'
import { plannerQuery } from '../../shared/schemas/sessions'

export function plannerRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/',
      roles: STAFF,
      handler: async (req, res) => {
        res.json(await plannerNumbers(ctx.knex, parse(plannerQuery, req.query)))
      },
    },
  ]
}
