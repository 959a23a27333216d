import type { AppContext } from '../context'
import { EDITORS, STAFF } from '../../shared/constants'
import type { RouteDef } from '../http/routeTable'
import { parse } from '../http/validate'
import { actorOf } from '../http/authenticate'
import { createExcerpt, listExcerpts, updateExcerpt } from './service'
import { createExcerptBody, updateExcerptBody } from '../../shared/schemas/clips'
import { idParam } from '../../shared/schemas/common'

export function excerptRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/',
      roles: STAFF,
      handler: async (_req, res) => {
        res.json({ excerpts: await listExcerpts(ctx.knex) })
      },
    },
    {
      method: 'post',
      path: '/',
      roles: EDITORS,
      handler: async (req, res) => {
        const body = parse(createExcerptBody, req.body)
        res.status(201).json({ excerpt: await createExcerpt(ctx, body, actorOf(req)) })
      },
    },
    {
      method: 'patch',
      path: '/:id',
      roles: EDITORS,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        const body = parse(updateExcerptBody, req.body)
        res.json({ excerpt: await updateExcerpt(ctx, id, body, actorOf(req)) })
      },
    },
  ]
}
