import type { AppContext } from '../context'
import { createItem, listItems, updateItem } from '../http/itemRoutes'
import { ADMIN } from '../../shared/constants'
import { route, type RouteDef } from '../http/routeTable'
import { actorOf } from '../http/authenticate'
import { inviteStaff, listStaff, resendStaffInvite, updateStaff } from './service'
import { inviteUserBody, updateUserBody } from '../../shared/schemas/users'
import { idParam } from '../../shared/schemas/common'

export function staffRoutes(ctx: AppContext): RouteDef[] {
  return [
    listItems({
      path: '/',
      roles: ADMIN,
      key: 'users',
      list: () => listStaff(ctx),
    }),
    createItem({
      path: '/',
      roles: ADMIN,
      key: 'user',
      body: inviteUserBody,
      create: (body, actor) => inviteStaff(ctx, body, actor),
    }),
    updateItem({
      path: '/:id',
      roles: ADMIN,
      key: 'user',
      body: updateUserBody,
      update: (id, body, actor) => updateStaff(ctx, id, body, actor),
    }),
    route({
      method: 'post',
      path: '/:id/resend-invite',
      roles: ADMIN,
      params: idParam,
      handler: async (req, res, { params }) => {
        await resendStaffInvite(ctx, params.id, actorOf(req))
        res.status(204).end()
      },
    }),
  ]
}
