/* Reading clips: the filtered list, one clip with its peaks, and where a clip's files lie. */
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { notFound } from '../errors'
import { mediaFolders, originalPath, renditionPath } from './storage'
import { clipQuery, toClip, toClipDetail, type ClipRow } from './rows'
import type { Clip, ClipDetail, ListClipsQuery } from '../../shared/schemas/clips'

export async function listClips(knex: Knex, query: ListClipsQuery): Promise<Clip[]> {
  const q = clipQuery(knex)
  if (query.recipeId) q.where('c.recipe_id', query.recipeId)
  if (query.excerptId) q.where('c.excerpt_id', query.excerptId)
  if (query.performerCode) q.where('c.performer_code', query.performerCode.toUpperCase())
  if (query.instrumentCode) q.where('c.instrument_code', query.instrumentCode.toUpperCase())
  if (query.kind) q.where('c.kind', query.kind)
  if (query.archived === 'hide') q.whereNull('c.archived_at')
  if (query.archived === 'only') q.whereNotNull('c.archived_at')
  const rows: ClipRow[] = await q.orderBy('c.id', 'desc')
  return rows.map(toClip)
}

export async function getClip(knex: Knex, id: number): Promise<ClipDetail> {
  const row: ClipRow | undefined = await clipQuery(knex).select('c.peaks').where('c.id', id).first()
  if (!row) throw notFound('Clip')
  return toClipDetail(row)
}

/** Where the blind rendition and the private original of a clip lie. */
export async function clipFiles(ctx: AppContext, id: number) {
  const row: { original_file: string; rendition_file: string; original_name: string } | undefined =
    await ctx.knex('clips').where({ id }).first('original_file', 'rendition_file', 'original_name')
  if (!row) throw notFound('Clip')
  const folders = mediaFolders(ctx.config.mediaDir)
  return {
    rendition: renditionPath(folders, row.rendition_file),
    original: originalPath(folders, row.original_file),
    originalName: row.original_name,
  }
}
