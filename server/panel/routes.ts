import multer from 'multer'
import type { AppContext } from '../context'
import { createItem, itemAction, listItems, readItem, updateItem } from '../http/itemRoutes'
import { route, type RouteDef } from '../http/routeTable'
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
import { ADMIN, EDITORS, LIMITS, STAFF } from '../../shared/constants'
import { badRequest } from '../errors'
import { refuseDeclaredOver } from '../http/uploadSize'

export function panelRoutes(ctx: AppContext): RouteDef[] {
  // A panel CSV is small; keep it in memory so nothing is left on disk.
  const csvUpload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: LIMITS.csvMaxBytes, files: 1, fields: 5 },
  }).single('file')

  return [
    route({
      method: 'get',
      path: '/summary',
      roles: STAFF,
      handler: async (_req, res) => {
        res.json(await panelSummary(ctx.knex))
      },
    }),
    listItems({
      path: '/players',
      roles: EDITORS,
      key: 'players',
      query: listPlayersQuery,
      list: (query) => listPlayers(ctx.knex, query),
    }),
    readItem({
      path: '/players/:id',
      roles: ADMIN,
      key: 'player',
      read: (id) => getPlayer(ctx.knex, id),
    }),
    createItem({
      path: '/players',
      roles: ADMIN,
      key: 'player',
      body: createPlayerBody,
      create: (body, actor) => createPlayer(ctx, body, actor),
    }),
    updateItem({
      path: '/players/:id',
      roles: ADMIN,
      key: 'player',
      body: updatePlayerBody,
      update: (id, body, actor) => updatePlayer(ctx, id, body, actor),
    }),
    itemAction({
      method: 'delete',
      path: '/players/:id',
      roles: ADMIN,
      key: 'player',
      act: (id, actor) => erasePlayer(ctx, id, actor),
    }),
    route({
      // The CSV is the upload itself; its rows are checked by the import, not by a body schema.
      method: 'post',
      path: '/import',
      roles: ADMIN,
      accepts: 'multipart',
      // Its own limits hold it to one small file; a request declaring more than any upload may
      // carry is refused before it is read.
      before: [refuseDeclaredOver(ctx.config.uploadBatchMaxMb), csvUpload],
      handler: async (req, res) => {
        if (!req.file) throw badRequest('Attach a CSV file in the field "file"')
        const text = req.file.buffer.toString('utf8')
        if (text.includes('\u0000')) throw badRequest('This is not a text CSV file')
        res.status(201).json(await importPanelCsv(ctx, text, actorOf(req)))
      },
    }),
  ]
}
