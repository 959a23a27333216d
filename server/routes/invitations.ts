import type { AppContext } from '../context'
import type { RouteDef } from './table'
import { parse } from '../middleware/validate'
import { actorOf } from '../middleware/authenticate'
import { remindInvitation, resendInvitation, revokeInvitation } from '../services/invitations'
import { idParam } from '../../shared/schemas/common'
import { EDITORS } from './sessions'

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
