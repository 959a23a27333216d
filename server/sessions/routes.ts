import type { AppContext } from '../context'
import { createItem, itemAction, listItems, updateItem } from '../http/itemRoutes'
import { EDITORS, STAFF } from '../../shared/constants'
import { route, type RouteDef } from '../http/routeTable'
import { actorOf } from '../http/authenticate'
import { getSession, listSessions } from './read'
import { createSession, updateSession } from './design'
import { closeSession, openSession } from './lifecycle'
import { addTimePoint } from './timePoints'
import { invitePlayers } from '../invitations/invite'
import { listInvitations } from '../invitations/tracking'
import { remindSession } from '../invitations/followUps'
import { sessionPreview } from './preview'
import { labelSheet, packingList } from '../invitations/labels'
import { loadSession } from './rows'
import { idParam } from '../../shared/schemas/common'
import {
  inviteBody,
  openSessionBody,
  previewQuery,
  sessionDesignBody,
  timePointBody,
  updateSessionBody,
} from '../../shared/schemas/sessions'

export function sessionRoutes(ctx: AppContext): RouteDef[] {
  const now = () => ctx.clock.now()
  return [
    listItems({
      path: '/',
      roles: STAFF,
      key: 'sessions',
      list: () => listSessions(ctx.knex),
    }),
    createItem({
      path: '/',
      roles: EDITORS,
      key: 'session',
      body: sessionDesignBody,
      create: (body, actor) => createSession(ctx, body, actor),
    }),
    route({
      method: 'get',
      path: '/:id',
      session: { access: 'results' },
      roles: STAFF,
      params: idParam,
      handler: async (_req, res, { params }) => {
        res.json({ session: await getSession(ctx.knex, params.id, now()) })
      },
    }),
    updateItem({
      path: '/:id',
      session: { access: 'manage' },
      roles: EDITORS,
      key: 'session',
      body: updateSessionBody,
      update: (id, body, actor) => updateSession(ctx, id, body, actor),
    }),
    route({
      method: 'post',
      path: '/:id/open',
      session: { access: 'manage' },
      roles: EDITORS,
      params: idParam,
      body: openSessionBody,
      handler: async (req, res, { params, body }) => {
        res.json({ session: await openSession(ctx, params.id, actorOf(req), body) })
      },
    }),
    itemAction({
      method: 'post',
      path: '/:id/close',
      session: { access: 'manage' },
      roles: EDITORS,
      key: 'session',
      act: (id, actor) => closeSession(ctx, id, actor),
    }),
    route({
      method: 'get',
      path: '/:id/preview',
      session: { access: 'results' },
      roles: STAFF,
      params: idParam,
      query: previewQuery,
      handler: async (_req, res, { params, query }) => {
        const session = await loadSession(ctx.knex, params.id)
        // Staff may hear the renditions under their own route; nothing is recorded.
        const plan = await sessionPreview(
          ctx.knex,
          session,
          query.player - 1,
          (clipId) => `/api/clips/${clipId}/audio`,
        )
        res.json({ plan })
      },
    }),
    route({
      method: 'post',
      path: '/:id/time-points',
      session: { access: 'manage' },
      roles: EDITORS,
      params: idParam,
      body: timePointBody,
      handler: async (req, res, { params, body }) => {
        res.status(201).json({ session: await addTimePoint(ctx, params.id, body, actorOf(req)) })
      },
    }),
    route({
      method: 'get',
      path: '/:id/invitations',
      session: { access: 'results' },
      roles: STAFF,
      params: idParam,
      handler: async (req, res, { params }) => {
        // Analysts work with player codes; names and addresses stay with those who send mail.
        const personal = req.user?.role !== 'analyst'
        res.json({ invitations: await listInvitations(ctx, params.id, now(), personal) })
      },
    }),
    route({
      method: 'post',
      path: '/:id/invitations',
      session: { access: 'manage' },
      roles: EDITORS,
      params: idParam,
      body: inviteBody,
      handler: async (req, res, { params, body }) => {
        res.json(await invitePlayers(ctx, params.id, body.playerIds, actorOf(req)))
      },
    }),
    route({
      method: 'post',
      path: '/:id/remind',
      session: { access: 'manage' },
      roles: EDITORS,
      params: idParam,
      handler: async (req, res, { params }) => {
        res.json(await remindSession(ctx, params.id, actorOf(req)))
      },
    }),
    route({
      method: 'get',
      path: '/:id/labels',
      session: { access: 'manage' },
      roles: EDITORS,
      params: idParam,
      handler: async (_req, res, { params }) => {
        res.json(await labelSheet(ctx, params.id))
      },
    }),
    route({
      method: 'get',
      // The key to the coded envelopes: a route of its own, so it never rides on the labels.
      path: '/:id/packing-list',
      session: { access: 'manage' },
      roles: EDITORS,
      params: idParam,
      handler: async (_req, res, { params }) => {
        res.json(await packingList(ctx, params.id))
      },
    }),
  ]
}
