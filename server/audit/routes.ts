import type { AppContext } from '../context'
import { ADMIN } from '../../shared/constants'
import type { RouteDef } from '../http/routeTable'
import { parse } from '../http/validate'
import { auditActions, listAudit } from './service'
import { listAuditQuery } from '../../shared/schemas/audit'

export function auditRoutes(ctx: AppContext): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/',
      roles: ADMIN,
      handler: async (req, res) => {
        const query = parse(listAuditQuery, req.query)
        res.json({ ...(await listAudit(ctx.knex, query)), actions: await auditActions(ctx.knex) })
      },
    },
  ]
}
