import type { AppContext } from '../context'
import { route, type RouteDef } from '../http/routeTable'
import { playerLanding } from './landing'
import { noToken } from './schemas'
import { playerLinkHeaders } from '../../shared/schemas/sessions'

/** Routes a player reaches with an invitation link and no sign-in. */
export function playerRoutes(ctx: AppContext): RouteDef[] {
  return [
    route({
      method: 'get',
      path: '/invitation',
      roles: 'public',
      headers: playerLinkHeaders,
      onInvalid: { headers: noToken },
      handler: async (_req, res, { headers }) => {
        res.setHeader('Cache-Control', 'no-store')
        res.json(await playerLanding(ctx, headers.token))
      },
    }),
  ]
}
