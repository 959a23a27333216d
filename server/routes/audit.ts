import type { AppContext } from '../context'
import { ADMIN, type RouteDef } from './table'
import { parse } from '../middleware/validate'
import { auditActions, listAudit } from '../services/audit'
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
