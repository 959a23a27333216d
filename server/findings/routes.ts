import type { Request, Response } from 'express'
import type { AppContext } from '../context'
import { EXCLUDERS, STAFF } from '../../shared/constants'
import { route, type RouteDef } from '../http/routeTable'
import { actorOf } from '../http/authenticate'
import { unauthenticated } from '../errors'
import { computeSessionFindings, getFindings, readableSession, type Viewer } from './service'
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

// Developers pass the role check here; the service then admits only their own sessions.

function viewerOf(req: Request): Viewer {
  if (!req.user) throw unauthenticated()
  return { userId: req.user.id, role: req.user.role }
}

function sendCsv(res: Response, fileName: string, body: string) {
  res.setHeader('Content-Type', 'text/csv; charset=utf-8')
  res.setHeader('Content-Disposition', `attachment; filename="${fileName}"`)
  res.setHeader('Cache-Control', 'no-store')
  res.send(body)
}

export function findingsRoutes(ctx: AppContext): RouteDef[] {
  const recomputed = (id: number, req: Request) => getFindings(ctx.knex, id, viewerOf(req))
  return [
    route({
      method: 'get',
      path: '/:id',
      roles: STAFF,
      params: idParam,
      query: findingsQuery,
      handler: async (req, res, { params, query }) => {
        res.json(await getFindings(ctx.knex, params.id, viewerOf(req), query))
      },
    }),
    route({
      method: 'post',
      path: '/:id/exclusions',
      roles: EXCLUDERS,
      params: idParam,
      body: excludePlayerBody,
      handler: async (req, res, { params, body }) => {
        await excludePlayer(ctx, params.id, body, actorOf(req))
        res.json(await recomputed(params.id, req))
      },
    }),
    route({
      method: 'delete',
      path: '/:id/exclusions/:playerCode',
      roles: EXCLUDERS,
      params: playerCodeParam,
      body: includePlayerBody,
      handler: async (req, res, { params: { id, playerCode }, body }) => {
        await includePlayer(ctx, id, playerCode, body, actorOf(req))
        res.json(await recomputed(id, req))
      },
    }),
    route({
      method: 'get',
      path: '/:id/export/answers.csv',
      roles: STAFF,
      params: idParam,
      handler: async (req, res, { params: { id } }) => {
        await readableSession(ctx.knex, id, viewerOf(req))
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
      params: exportTableParam,
      query: findingsQuery,
      handler: async (req, res, { params: { id, table }, query }) => {
        await readableSession(ctx.knex, id, viewerOf(req))
        const { findings } = await computeSessionFindings(ctx.knex, id, query)
        sendCsv(res, exportFileName(id, table), tableCsv(findings, table))
      },
    }),
  ]
}
