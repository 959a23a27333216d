import type { AppContext } from '../context'
import { ADMIN } from '../../shared/constants'
import { route, type RouteDef } from '../http/routeTable'
import { auditActions, listAudit } from './service'
import { listAuditQuery } from '../../shared/schemas/audit'

export function auditRoutes(ctx: AppContext): RouteDef[] {
  return [
    route({
      method: 'get',
      path: '/',
      roles: ADMIN,
      query: listAuditQuery,
      handler: async (_req, res, { query }) => {
        res.json({ ...(await listAudit(ctx.knex, query)), actions: await auditActions(ctx.knex) })
      },
    }),
  ]
}
