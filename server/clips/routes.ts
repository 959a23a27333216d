import { readFile } from 'node:fs/promises'
import type { Response } from 'express'
import type { AppContext } from '../context'
import { itemAction, listItems, readItem, updateItem } from '../http/itemRoutes'
import { archiveClip, restoreClip } from './archive'
import { route, type RouteDef } from '../http/routeTable'
import { actorOf } from '../http/authenticate'
import { discardTempFiles, filesOf, tempUpload } from './upload'
import { discardUpload, requireFile } from './uploadGuards'
import { badRequest, notFound } from '../errors'
import { clipFiles, getClip, listClips } from './read'
import { uploadClip } from './intake'
import { deleteClip, updateClip } from './edit'
import { importClipManifest } from './manifestImport'
import { matchedSets } from './matchedSets'
import { mediaFolders } from './storage'
import {
  CLIP_LIMITS,
  clipUploadBody,
  listClipsQuery,
  updateClipBody,
} from '../../shared/schemas/clips'
import { idParam } from '../../shared/schemas/common'
import { EDITORS, LIMITS, STAFF } from '../../shared/constants'

/** Sends a media file with Range support; a file gone missing is a 404, not a 500. */
function sendMedia(
  res: Response,
  path: string,
  options: { download?: string; type?: string },
): Promise<void> {
  return new Promise((resolve, reject) => {
    const done = (err?: Error & { code?: string; status?: number }) => {
      if (!err) return resolve()
      if (res.headersSent) return resolve()
      reject(err.code === 'ENOENT' || err.status === 404 ? notFound('The audio file') : err)
    }
    // No Last-Modified: the time a file was written says nothing a listener needs.
    const common = {
      lastModified: false,
      headers: {
        'Cache-Control': 'private, no-cache',
        ...(options.type ? { 'Content-Type': options.type } : {}),
      },
    }
    if (options.download) res.download(path, options.download, common, done)
    else res.sendFile(path, common, done)
  })
}

export function clipRoutes(ctx: AppContext): RouteDef[] {
  const dir = mediaFolders(ctx.config.mediaDir).incoming
  const maxMb = ctx.config.uploadMaxMb
  const batchMaxMb = ctx.config.uploadBatchMaxMb
  const single = tempUpload({ dir, maxMb, batchMaxMb, fields: [{ name: 'file', maxCount: 1 }] })
  const batch = tempUpload({
    dir,
    maxMb,
    batchMaxMb,
    fields: [
      { name: 'manifest', maxCount: 1 },
      { name: 'files', maxCount: CLIP_LIMITS.batchMaxFiles },
    ],
  })

  return [
    listItems({
      path: '/',
      roles: STAFF,
      key: 'clips',
      query: listClipsQuery,
      list: (query) => listClips(ctx.knex, query),
    }),
    listItems({
      path: '/matched-sets',
      roles: STAFF,
      key: 'sections',
      list: () => matchedSets(ctx.knex),
    }),
    route({
      method: 'post',
      path: '/',
      roles: EDITORS,
      accepts: 'multipart',
      // The multipart fields are the body, so they are checked after the upload and its file.
      before: [single, requireFile('file', 'Attach the recording in the field "file"')],
      body: clipUploadBody,
      onInvalid: { body: discardUpload },
      handler: async (req, res, { body }) => {
        try {
          const [file] = filesOf(req, 'file')
          res.status(201).json({ clip: await uploadClip(ctx, file, body, actorOf(req)) })
        } finally {
          discardTempFiles(res)
        }
      },
    }),
    route({
      method: 'post',
      path: '/batch',
      roles: EDITORS,
      accepts: 'multipart',
      before: [batch],
      handler: async (req, res) => {
        try {
          const [manifest] = filesOf(req, 'manifest')
          if (!manifest) throw badRequest('Attach the manifest CSV in the field "manifest"')
          if (manifest.size > LIMITS.csvMaxBytes)
            throw badRequest(`The manifest is larger than ${LIMITS.csvMaxBytes / 1_000_000} MB`)
          const text = await readFile(manifest.path, 'utf8')
          if (text.includes('\u0000')) throw badRequest('The manifest is not a text CSV file')
          const files = filesOf(req, 'files')
          res.status(201).json(await importClipManifest(ctx, text, files, actorOf(req)))
        } finally {
          discardTempFiles(res)
        }
      },
    }),
    readItem({
      path: '/:id',
      roles: STAFF,
      key: 'clip',
      read: (id) => getClip(ctx.knex, id),
    }),
    updateItem({
      path: '/:id',
      roles: EDITORS,
      key: 'clip',
      body: updateClipBody,
      update: (id, body, actor) => updateClip(ctx, id, body, actor),
    }),
    itemAction({
      method: 'delete',
      path: '/:id',
      roles: EDITORS,
      act: (id, actor) => deleteClip(ctx, id, actor),
    }),
    itemAction({
      method: 'post',
      path: '/:id/archive',
      roles: EDITORS,
      key: 'clip',
      act: (id, actor) => archiveClip(ctx, id, actor),
    }),
    itemAction({
      method: 'post',
      path: '/:id/restore',
      roles: EDITORS,
      key: 'clip',
      act: (id, actor) => restoreClip(ctx, id, actor),
    }),
    route({
      // The blind rendition; players will reach renditions through session codes, not here.
      method: 'get',
      path: '/:id/audio',
      roles: STAFF,
      params: idParam,
      handler: async (_req, res, { params }) => {
        const { rendition } = await clipFiles(ctx, params.id)
        await sendMedia(res, rendition, { type: 'audio/wav' })
      },
    }),
    route({
      method: 'get',
      path: '/:id/original',
      roles: EDITORS,
      params: idParam,
      handler: async (_req, res, { params }) => {
        const { original, originalName } = await clipFiles(ctx, params.id)
        await sendMedia(res, original, { download: originalName })
      },
    }),
  ]
}
