import multer from 'multer'
import type { AppContext } from '../context'
import type { RouteDef } from '../http/routeTable'
import { parse } from '../http/validate'
import { actorOf } from '../http/authenticate'
import {
  createPlayer,
  erasePlayer,
  getPlayer,
  listPlayers,
  panelSummary,
  updatePlayer,
} from './service'
import { importPanelCsv } from './csvImport'
import { createPlayerBody, listPlayersQuery, updatePlayerBody } from '../../shared/schemas/panel'
import { idParam } from '../../shared/schemas/common'
import { ADMIN, EDITORS, LIMITS, STAFF } from '../../shared/constants'
import { badRequest } from '../errors'

export function panelRoutes(ctx: AppContext): RouteDef[] {
  // A panel CSV is small; keep it in memory so nothing is left on disk.
  const csvUpload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: LIMITS.csvMaxBytes, files: 1, fields: 5 },
  }).single('file')

  return [
    {
      method: 'get',
      path: '/summary',
      roles: STAFF,
      handler: async (_req, res) => {
        res.json(await panelSummary(ctx.knex))
      },
    },
    {
      method: 'get',
      path: '/players',
      roles: EDITORS,
      handler: async (req, res) => {
        const query = parse(listPlayersQuery, req.query)
        res.json({ players: await listPlayers(ctx.knex, query) })
      },
    },
    {
      method: 'get',
      path: '/players/:id',
      roles: ADMIN,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        res.json({ player: await getPlayer(ctx.knex, id) })
      },
    },
    {
      method: 'post',
      path: '/players',
      roles: ADMIN,
      handler: async (req, res) => {
        const body = parse(createPlayerBody, req.body)
        res.status(201).json({ player: await createPlayer(ctx, body, actorOf(req)) })
      },
    },
    {
      method: 'patch',
      path: '/players/:id',
      roles: ADMIN,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        const body = parse(updatePlayerBody, req.body)
        res.json({ player: await updatePlayer(ctx, id, body, actorOf(req)) })
      },
    },
    {
      method: 'delete',
      path: '/players/:id',
      roles: ADMIN,
      handler: async (req, res) => {
        const { id } = parse(idParam, req.params)
        res.json({ player: await erasePlayer(ctx, id, actorOf(req)) })
      },
    },
    {
      method: 'post',
      path: '/import',
      roles: ADMIN,
      before: [csvUpload],
      handler: async (req, res) => {
        if (!req.file) throw badRequest('Attach a CSV file in the field "file"')
        const text = req.file.buffer.toString('utf8')
        if (text.includes('\u0000')) throw badRequest('This is not a text CSV file')
        res.status(201).json(await importPanelCsv(ctx, text, actorOf(req)))
      },
    },
  ]
}
