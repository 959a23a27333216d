import type { AppContext } from '../context'
import { EDITORS } from '../../shared/constants'
import type { RouteDef } from '../http/routeTable'
import { parse } from '../http/validate'
import { actorOf } from '../http/authenticate'
import { remindInvitation, resendInvitation, revokeInvitation } from './service'
import { idParam } from '../../shared/schemas/common'

export function invitationRoutes(ctx: AppContext): RouteDef[] {
  const action = (path: string, run: typeof resendInvitation): RouteDef => ({
    method: 'post',
    path,
    roles: EDITORS,
    handler: async (req, res) => {
      const { id } = parse(idParam, req.params)
      res.json({ invitation: await run(ctx, id, actorOf(req)) })
    },
  })
  return [
    action('/:id/resend', resendInvitation),
    action('/:id/remind', remindInvitation),
    action('/:id/revoke', revokeInvitation),
  ]
}
