import type { AppContext } from '../context'
import type { RouteDef } from '../http/routeTable'
import { invalidToken } from '../errors'
import { playerLanding } from './landing'
import { playerLinkQuery } from '../../shared/schemas/sessions'

/** Routes a player reaches with an invitation link and no sign-in. */
export function playerRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/invitation',
      roles: 'public',
      handler: async (req, res) => {
        const query = playerLinkQuery.safeParse(req.query)
        if (!query.success)
          throw invalidToken('This link has no token: open it from your invitation.')
        const { token } = query.data
        res.setHeader('Cache-Control', 'no-store')
        res.json(await playerLanding(ctx, token))
      },
    },
  ]
}
