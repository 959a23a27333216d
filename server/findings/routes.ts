import type { Request, Response } from 'express'
import type { AppContext } from '../context'
import { EXCLUDERS, STAFF } from '../../shared/constants'
import type { RouteDef } from '../http/routeTable'
import { parse } from '../http/validate'
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
    {
      method: 'get',
      path: '/:id',
      roles: STAFF,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        const group = parse(findingsQuery, req.query)
        res.json(await getFindings(ctx.knex, id, viewerOf(req), group))
      },
    },
    {
      method: 'post',
      path: '/:id/exclusions',
      roles: EXCLUDERS,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        const body = parse(excludePlayerBody, req.body)
        await excludePlayer(ctx, id, body, actorOf(req))
        res.json(await recomputed(id, req))
      },
    },
    {
      method: 'delete',
      path: '/:id/exclusions/:playerCode',
      roles: EXCLUDERS,
      handler: async (req, res) => {
        const { id, playerCode } = parse(playerCodeParam, req.params)
        const body = parse(includePlayerBody, req.body)
        await includePlayer(ctx, id, playerCode, body, actorOf(req))
        res.json(await recomputed(id, req))
      },
    },
    {
      method: 'get',
      path: '/:id/export/answers.csv',
      roles: STAFF,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        await readableSession(ctx.knex, id, viewerOf(req))
        sendCsv(
          res,
          exportFileName(id, 'answers'),
          answersCsv(await loadFindingsData(ctx.knex, id)),
        )
      },
    },
    {
      method: 'get',
      path: '/:id/export/:table.csv',
      roles: STAFF,
      handler: async (req, res) => {
        const { id, table } = parse(exportTableParam, req.params)
        const group = parse(findingsQuery, req.query)
        await readableSession(ctx.knex, id, viewerOf(req))
        const { findings } = await computeSessionFindings(ctx.knex, id, group)
        sendCsv(res, exportFileName(id, table), tableCsv(findings, table))
      },
    },
  ]
}
