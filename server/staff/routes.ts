import type { AppContext } from '../context'
import { ADMIN } from '../../shared/constants'
import { route, type RouteDef } from '../http/routeTable'
import { actorOf } from '../http/authenticate'
import { inviteStaff, listStaff, resendStaffInvite, updateStaff } from './service'
import { inviteUserBody, updateUserBody } from '../../shared/schemas/users'
import { idParam } from '../../shared/schemas/common'

export function staffRoutes(ctx: AppContext): RouteDef[] {
  return [
    route({
      method: 'get',
      path: '/',
      roles: ADMIN,
      handler: async (_req, res) => {
        res.json({ users: await listStaff(ctx) })
      },
    }),
    route({
      method: 'post',
      path: '/',
      roles: ADMIN,
      body: inviteUserBody,
      handler: async (req, res, { body }) => {
        res.status(201).json({ user: await inviteStaff(ctx, body, actorOf(req)) })
      },
    }),
    route({
      method: 'patch',
      path: '/:id',
      roles: ADMIN,
      params: idParam,
      body: updateUserBody,
      handler: async (req, res, { params, body }) => {
        res.json({ user: await updateStaff(ctx, params.id, body, actorOf(req)) })
      },
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
