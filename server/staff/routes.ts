import type { AppContext } from '../context'
import { ADMIN } from '../../shared/constants'
import type { RouteDef } from '../http/routeTable'
import { parse } from '../http/validate'
import { actorOf } from '../http/authenticate'
import { inviteStaff, listStaff, resendStaffInvite, updateStaff } from './service'
import { inviteUserBody, updateUserBody } from '../../shared/schemas/users'
import { idParam } from '../../shared/schemas/common'

export function staffRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/',
      roles: ADMIN,
      handler: async (_req, res) => {
        res.json({ users: await listStaff(ctx) })
      },
    },
    {
      method: 'post',
      path: '/',
      roles: ADMIN,
      handler: async (req, res) => {
        const body = parse(inviteUserBody, req.body)
        res.status(201).json({ user: await inviteStaff(ctx, body, actorOf(req)) })
      },
    },
    {
      method: 'patch',
      path: '/:id',
      roles: ADMIN,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        const body = parse(updateUserBody, req.body)
        res.json({ user: await updateStaff(ctx, id, body, actorOf(req)) })
      },
    },
    {
      method: 'post',
      path: '/:id/resend-invite',
      roles: ADMIN,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        await resendStaffInvite(ctx, id, actorOf(req))
        res.status(204).end()
      },
    },
  ]
}
