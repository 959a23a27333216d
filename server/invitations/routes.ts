import type { AppContext } from '../context'
import { EDITORS } from '../../shared/constants'
import type { RouteDef } from '../http/routeTable'
import { itemAction } from '../http/itemRoutes'
import { remindInvitation, resendInvitation, revokeInvitation } from './followUps'

export function invitationRoutes(ctx: AppContext): RouteDef[] {
  const action = (path: string, run: typeof resendInvitation): RouteDef =>
    itemAction({
      method: 'post',
      path,
      roles: EDITORS,
      key: 'invitation',
      session: { access: 'manage', of: 'invitation' },
      act: (id, actor) => run(ctx, id, actor),
    })
  return [
    action('/:id/resend', resendInvitation),
    action('/:id/remind', remindInvitation),
    action('/:id/revoke', revokeInvitation),
  ]
}
