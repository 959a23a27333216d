import type { AppContext } from '../context'
import { EDITORS } from '../../shared/constants'
import { route, type RouteDef } from '../http/routeTable'
import { actorOf } from '../http/authenticate'
import { remindInvitation, resendInvitation, revokeInvitation } from './followUps'
import { idParam } from '../../shared/schemas/common'

export function invitationRoutes(ctx: AppContext): RouteDef[] {
  const action = (path: string, run: typeof resendInvitation): RouteDef =>
    route({
      method: 'post',
      path,
      roles: EDITORS,
      params: idParam,
      handler: async (req, res, { params }) => {
        res.json({ invitation: await run(ctx, params.id, actorOf(req)) })
      },
    })
  return [
    action('/:id/resend', resendInvitation),
    action('/:id/remind', remindInvitation),
    action('/:id/revoke', revokeInvitation),
  ]
}
