import type { AppContext } from '../context'
import { EDITORS, STAFF } from '../../shared/constants'
import { route, type RouteDef } from '../http/routeTable'
import { actorOf } from '../http/authenticate'
import { createExcerpt, listExcerpts, updateExcerpt } from './service'
import { createExcerptBody, updateExcerptBody } from '../../shared/schemas/clips'
import { idParam } from '../../shared/schemas/common'

export function excerptRoutes(ctx: AppContext): RouteDef[] {
  return [
    route({
      method: 'get',
      path: '/',
      roles: STAFF,
      handler: async (_req, res) => {
        res.json({ excerpts: await listExcerpts(ctx.knex) })
      },
    }),
    route({
      method: 'post',
      path: '/',
      roles: EDITORS,
      body: createExcerptBody,
      handler: async (req, res, { body }) => {
        res.status(201).json({ excerpt: await createExcerpt(ctx, body, actorOf(req)) })
      },
    }),
    route({
      method: 'patch',
      path: '/:id',
      roles: EDITORS,
      params: idParam,
      body: updateExcerptBody,
      handler: async (req, res, { params, body }) => {
        res.json({ excerpt: await updateExcerpt(ctx, params.id, body, actorOf(req)) })
      },
    }),
  ]
}
