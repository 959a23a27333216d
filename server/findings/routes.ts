import type { Response } from 'express'
import type { AppContext } from '../context'
import { EXCLUDERS, STAFF } from '../../shared/constants'
import { route, type RouteDef } from '../http/routeTable'
import { actorOf } from '../http/authenticate'
import { computeSessionFindings, getFindings } from './service'
import { excludePlayer, includePlayer } from './exclusions'
import { loadFindingsData } from './data'
import { answersCsv, exportFileName, tableCsv } from './exportCsv'
import { idParam } from '../../shared/schemas/common'
import {
  excludePlayerBody,
  exportTableParam,
  findingsQuery,
  includePlayerBody,
  playerCodeParam,
} from '../../shared/schemas/findings'

// Developers pass the role check here; the session rule then admits only their own sessions.

function sendCsv(res: Response, fileName: string, body: string) {
  res.setHeader('Content-Type', 'text/csv; charset=utf-8')
  res.setHeader('Content-Disposition', `attachment; filename="${fileName}"`)
  res.setHeader('Cache-Control', 'no-store')
  res.send(body)
}

export function findingsRoutes(ctx: AppContext): RouteDef[] {
  const recomputed = (id: number) => getFindings(ctx.knex, id)
  return [
    route({
      method: 'get',
      path: '/:id',
      roles: STAFF,
      session: { access: 'results' },
      params: idParam,
      query: findingsQuery,
      handler: async (_req, res, { params, query }) => {
        res.json(await getFindings(ctx.knex, params.id, query))
      },
    }),
    route({
      method: 'post',
      path: '/:id/exclusions',
      roles: EXCLUDERS,
      session: { access: 'results' },
      params: idParam,
      body: excludePlayerBody,
      handler: async (req, res, { params, body }) => {
        await excludePlayer(ctx, params.id, body, actorOf(req))
        res.json(await recomputed(params.id))
      },
    }),
    route({
      method: 'delete',
      path: '/:id/exclusions/:playerCode',
      roles: EXCLUDERS,
      session: { access: 'results' },
      params: playerCodeParam,
      body: includePlayerBody,
      handler: async (req, res, { params: { id, playerCode }, body }) => {
        await includePlayer(ctx, id, playerCode, body, actorOf(req))
        res.json(await recomputed(id))
      },
    }),
    route({
      method: 'get',
      path: '/:id/export/answers.csv',
      roles: STAFF,
      session: { access: 'results' },
      params: idParam,
      handler: async (_req, res, { params: { id } }) => {
        sendCsv(
          res,
          exportFileName(id, 'answers'),
          answersCsv(await loadFindingsData(ctx.knex, id)),
        )
      },
    }),
    route({
      method: 'get',
      path: '/:id/export/:table.csv',
      roles: STAFF,
      session: { access: 'results' },
      params: exportTableParam,
      query: findingsQuery,
      handler: async (_req, res, { params: { id, table }, query }) => {
        const { findings } = await computeSessionFindings(ctx.knex, id, query)
        sendCsv(res, exportFileName(id, table), tableCsv(findings, table))
      },
    }),
  ]
}
