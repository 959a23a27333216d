import type { AppContext } from '../context'
import { ADMIN } from '../../shared/constants'
import { route, type RouteDef } from '../http/routeTable'
import { notFound } from '../errors'
import { idParam } from '../../shared/schemas/common'
import { outboxQuery } from '../../shared/schemas/audit'
import { actorOf } from '../http/authenticate'
import { recordAudit } from '../audit/service'

export function mailRoutes(ctx: AppContext): RouteDef[] {
  const routes: RouteDef[] = [
    route({
      method: 'get',
      path: '/outbox',
      roles: ADMIN,
      query: outboxQuery,
      handler: async (_req, res, { query }) => {
        res.json({ mails: await ctx.outbox.list({ status: query.status }) })
      },
    }),
    route({
      method: 'post',
      path: '/outbox/:id/retry',
      roles: ADMIN,
      params: idParam,
      handler: async (req, res, { params: { id } }) => {
        if (!(await ctx.outbox.retry(id))) throw notFound('A waiting or failed mail with this id')
        await recordAudit(ctx.knex, ctx.clock.now(), actorOf(req), {
          action: 'mail.retried',
          targetType: 'mail',
          targetId: id,
        })
        res.status(204).end()
      },
    }),
  ]
  const mailbox = ctx.mailbox
  // The Mailbox exists only where the local mail fake runs, never in production.
  if (mailbox && ctx.config.env !== 'production') {
    routes.push(
      route({
        method: 'get',
        path: '/mailbox',
        roles: ADMIN,
        handler: (_req, res) => {
          res.json({ mails: mailbox.list() })
        },
      }),
    )
  }
  return routes
}
