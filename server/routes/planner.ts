import type { AppContext } from '../context'
import { STAFF, type RouteDef } from './table'
import { parse } from '../middleware/validate'
import { plannerNumbers } from '../services/planner'
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
