import { z } from 'zod'
import type { AppContext } from '../context'
import { ADMIN } from '../../shared/constants'
import type { RouteDef } from '../http/routeTable'
import { parse } from '../http/validate'
import { notFound } from '../errors'
import { idParam } from '../../shared/schemas/common'
import { actorOf } from '../http/authenticate'
import { recordAudit } from '../audit/service'

const outboxQuery = z.object({ status: z.enum(['pending', 'sent', 'failed']).optional() })

export function mailRoutes(ctx: AppContext): RouteDef[] {
  const routes: RouteDef[] = [
    {
      method: 'get',
      path: '/outbox',
      roles: ADMIN,
      handler: async (req, res) => {
        const { status } = parse(outboxQuery, req.query)
        res.json({ mails: await ctx.outbox.list({ status }) })
      },
    },
    {
      method: 'post',
      path: '/outbox/:id/retry',
      roles: ADMIN,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        if (!(await ctx.outbox.retry(id))) throw notFound('Mail waiting to be sent')
        await recordAudit(ctx.knex, ctx.clock.now(), actorOf(req), {
          action: 'mail.retried',
          targetType: 'mail',
          targetId: id,
        })
        res.status(204).end()
      },
    },
  ]
  const mailbox = ctx.mailbox
  // The Mailbox exists only where the local mail fake runs, never in production.
  if (mailbox && ctx.config.env !== 'production') {
    routes.push({
      method: 'get',
      path: '/mailbox',
      roles: ADMIN,
      handler: (_req, res) => {
        res.json({ mails: mailbox.list() })
      },
    })
  }
  return routes
}
