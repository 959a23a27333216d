import type { AppContext } from '../context'
import { EDITORS, STAFF } from '../../shared/constants'
import type { RouteDef } from '../http/routeTable'
import { parse } from '../http/validate'
import { actorOf } from '../http/authenticate'
import {
  closeSession,
  createSession,
  getSession,
  listSessions,
  openSession,
  updateSession,
} from './service'
import { addTimePoint } from './timePoints'
import { invitePlayers, listInvitations, remindSession } from '../invitations/service'
import { sessionPreview } from './preview'
import { labelSheet } from '../invitations/labels'
import { loadSession } from './rows'
import { idParam } from '../../shared/schemas/common'
import {
  inviteBody,
  previewQuery,
  sessionDesignBody,
  timePointBody,
  updateSessionBody,
} from '../../shared/schemas/sessions'

export function sessionRoutes(ctx: AppContext): RouteDef[] {
  const now = () => ctx.clock.now()
  return [
    {
      method: 'get',
      path: '/',
      roles: STAFF,
      handler: async (_req, res) => {
        res.json({ sessions: await listSessions(ctx.knex) })
      },
    },
    {
      method: 'post',
      path: '/',
      roles: EDITORS,
      handler: async (req, res) => {
        const body = parse(sessionDesignBody, req.body)
        res.status(201).json({ session: await createSession(ctx, body, actorOf(req)) })
      },
    },
    {
      method: 'get',
      path: '/:id',
      roles: STAFF,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        res.json({ session: await getSession(ctx.knex, id, now()) })
      },
    },
    {
      method: 'patch',
      path: '/:id',
      roles: EDITORS,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        const body = parse(updateSessionBody, req.body)
        res.json({ session: await updateSession(ctx, id, body, actorOf(req)) })
      },
    },
    {
      method: 'post',
      path: '/:id/open',
      roles: EDITORS,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        res.json({ session: await openSession(ctx, id, actorOf(req)) })
      },
    },
    {
      method: 'post',
      path: '/:id/close',
      roles: EDITORS,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        res.json({ session: await closeSession(ctx, id, actorOf(req)) })
      },
    },
    {
      method: 'get',
      path: '/:id/preview',
      roles: STAFF,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        const { player } = parse(previewQuery, req.query)
        const session = await loadSession(ctx.knex, id)
        // Staff may hear the renditions under their own route; nothing is recorded.
        const plan = await sessionPreview(
          ctx.knex,
          session,
          player - 1,
          (clipId) => `/api/clips/${clipId}/audio`,
        )
        res.json({ plan })
      },
    },
    {
      method: 'post',
      path: '/:id/time-points',
      roles: EDITORS,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        const body = parse(timePointBody, req.body)
        res.status(201).json({ session: await addTimePoint(ctx, id, body, actorOf(req)) })
      },
    },
    {
      method: 'get',
      path: '/:id/invitations',
      roles: STAFF,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        // Analysts work with player codes; names and addresses stay with those who send mail.
        const personal = req.user?.role !== 'analyst'
        res.json({ invitations: await listInvitations(ctx.knex, id, now(), personal) })
      },
    },
    {
      method: 'post',
      path: '/:id/invitations',
      roles: EDITORS,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        const { playerIds } = parse(inviteBody, req.body)
        res.json(await invitePlayers(ctx, id, playerIds, actorOf(req)))
      },
    },
    {
      method: 'post',
      path: '/:id/remind',
      roles: EDITORS,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        res.json({ reminded: await remindSession(ctx, id, actorOf(req)) })
      },
    },
    {
      method: 'get',
      path: '/:id/labels',
      roles: EDITORS,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        res.json(await labelSheet(ctx, id))
      },
    },
  ]
}
