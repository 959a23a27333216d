import type { Response } from 'express'
import type { AppContext } from '../context'
import { EXCLUDERS, STAFF } from '../../shared/constants'
import { route, type RouteDef } from '../http/routeTable'
import { actorOf } from '../http/authenticate'
import { findingsReader } from './reader'
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

function sendJson(res: Response, body: string) {
  res.type('application/json').send(body)
}

export function findingsRoutes(ctx: AppContext): RouteDef[] {
  const findings = findingsReader(ctx)
  return [
    route({
      method: 'get',
      path: '/:id',
      roles: STAFF,
      session: { access: 'results' },
      params: idParam,
      query: findingsQuery,
      handler: async (_req, res, { params, query }) => {
        sendJson(res, await findings.json(params.id, query))
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
        sendJson(res, await findings.json(params.id))
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
        sendJson(res, await findings.json(id))
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
          answersCsv(await loadFindingsData(ctx.knex, id, { rows: true })),
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
        sendCsv(res, exportFileName(id, table), tableCsv(await findings.read(id, query), table))
      },
    }),
  ]
}
