import type { Knex } from 'knex'
import type { AppContext } from '../context'
import type { Clock } from '../clock'
import { notFound, validationFailed } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import {
  contentTypeProblem,
  fileNameProblem,
  keepOriginal,
  mediaFolders,
  originalPath,
  readOriginal,
  readUpload,
  removeMedia,
  renditionPath,
  writeOriginal,
  type MediaFolders,
  type UploadedFile,
} from './storage'
import { measureColumns, measureRecording, RecordingRefused, type Measured } from './measure'
import {
  discardChanges,
  loadSetMembers,
  planGains,
  renderChanges,
  replacedFiles,
  setKeyId,
  type RenditionChange,
  type SetKey,
  type SetMember,
} from './renditions'
import { resolveClipFields, type ResolvedFields } from './fields'
import { clipQuery, toClip, toClipDetail, type ClipRow } from './rows'
import { assertClipChangeAllowed, assertClipDeletable } from './archive'
import type { Clip, ClipDetail, ClipUploadFields, ListClipsQuery } from '../../shared/schemas/clips'

/** What clip storage needs; the demo seed builds it without an HTTP app. */
export interface ClipDeps {
  knex: Knex
  folders: MediaFolders
  clock: Clock
}

export const clipDeps = (ctx: AppContext): ClipDeps => ({
  knex: ctx.knex,
  folders: mediaFolders(ctx.config.mediaDir),
  clock: ctx.clock,
})

/** One recording checked and measured, ready to be stored. */
export interface PreparedClip {
  fields: ResolvedFields
  originalName: string
  measured: Measured
  /** Either an upload waiting in the temp folder or bytes made on the server. */
  source: { tempPath: string } | { bytes: Uint8Array }
}

// Set gains depend on every member of a set, so changes to sets run one at a time.
const queues = new WeakMap<Knex, Promise<unknown>>()
function serialised<T>(knex: Knex, work: () => Promise<T>): Promise<T> {
  const previous = queues.get(knex) ?? Promise.resolve()
  const next = previous.catch(() => undefined).then(work)
  queues.set(knex, next)
  return next
}

const keyOf = (f: ResolvedFields): SetKey => ({
  excerptId: f.excerptId,
  performerCode: f.performerCode,
  instrumentCode: f.instrumentCode,
})

/**
 * Brings the sets named by `keys` to their gains (with `extra` members joining and `excludeIds`
 * leaving), then runs `write` in the same transaction as the rendition updates. New renditions
 * are removed if anything fails; replaced ones only once the transaction has committed.
 */
async function withBalancedSets<T>(
  deps: ClipDeps,
  keys: SetKey[],
  change: { extra?: SetMember[]; excludeIds?: number[] },
  write: (trx: Knex.Transaction, changes: RenditionChange[]) => Promise<T>,
): Promise<T> {
  const existing = await loadSetMembers(deps.knex, keys, change.excludeIds)
  const gains = planGains([...existing, ...(change.extra ?? [])])
  const changes = await renderChanges(deps.folders, gains)
  let result: T
  try {
    result = await deps.knex.transaction(async (trx) => {
      const now = deps.clock.now().toISOString()
      for (const c of changes) {
        if (c.member.clipId === null) continue
        await trx('clips')
          .where({ id: c.member.clipId })
          .update({ rendition_file: c.file, rendition_gain_db: c.gainDb, updated_at: now })
      }
      return write(trx, changes)
    })
  } catch (err) {
    await discardChanges(deps.folders, changes)
    throw err
  }
  await removeMedia(replacedFiles(deps.folders, changes))
  return result
}

/** Stores checked recordings all together: every file and row, or none of them. */
export function storeClips(
  deps: ClipDeps,
  prepared: PreparedClip[],
  actor: Actor,
  audit: { action: string; details?: Record<string, unknown> },
): Promise<Clip[]> {
  return serialised(deps.knex, async () => {
    const originals: string[] = []
    try {
      const members: SetMember[] = []
      for (const p of prepared) {
        const file =
          'tempPath' in p.source
            ? await keepOriginal(deps.folders, p.source.tempPath, p.measured.container)
            : await writeOriginal(deps.folders, p.source.bytes, p.measured.container)
        originals.push(file)
        members.push({
          key: keyOf(p.fields),
          clipId: null,
          loudnessLufs: p.measured.loudnessLufs,
          peakDbfs: p.measured.analysis.peakDbfs,
          bitDepth: p.measured.analysis.bitDepth,
          originalFile: file,
          renditionFile: null,
          gainDb: null,
        })
      }
      const ids = await withBalancedSets(
        deps,
        members.map((m) => m.key),
        { extra: members },
        async (trx, changes) => {
          const now = deps.clock.now().toISOString()
          const inserted: number[] = []
          for (const [i, p] of prepared.entries()) {
            const rendition = changes.find((c) => c.member === members[i])!
            const [id] = await trx('clips').insert({
              ...fieldColumns(p.fields),
              original_name: p.originalName,
              original_file: members[i].originalFile,
              rendition_file: rendition.file,
              rendition_gain_db: rendition.gainDb,
              ...measureColumns(p.measured),
              created_by: actor.userId,
              created_at: now,
              updated_at: now,
            })
            inserted.push(id as number)
          }
          await recordAudit(trx, deps.clock.now(), actor, {
            action: audit.action,
            targetType: 'clip',
            targetId: inserted.length === 1 ? inserted[0] : undefined,
            details: { count: inserted.length, ...audit.details },
          })
          return inserted
        },
      )
      const rows: ClipRow[] = await clipQuery(deps.knex).whereIn('c.id', ids).orderBy('c.id')
      return rows.map(toClip)
    } catch (err) {
      await removeMedia(originals.map((f) => originalPath(deps.folders, f)))
      throw err
    }
  })
}

function fieldColumns(f: ResolvedFields) {
  return {
    recipe_id: f.recipeId,
    excerpt_id: f.excerptId,
    performer_code: f.performerCode,
    instrument_code: f.instrumentCode,
    bow_stroke: f.bowStroke,
    string_played: f.stringPlayed,
    strings_age_days: f.stringsAgeDays,
    recorded_on: f.recordedOn,
    kind: f.kind,
    notes: f.notes,
  }
}

/** Why an uploaded file cannot even be opened: its name or declared type. */
export function uploadProblem(file: UploadedFile): string | null {
  return fileNameProblem(file.name) ?? contentTypeProblem(file.mimeType)
}

/** Measures an upload; a refusal names the file and the reason. */
export async function measureUpload(file: UploadedFile, kind: ClipUploadFields['kind']) {
  const problem = uploadProblem(file)
  if (problem) throw new RecordingRefused(problem)
  return measureRecording(await readUpload(file), kind)
}

export async function uploadClip(
  ctx: AppContext,
  file: UploadedFile,
  body: ClipUploadFields,
  actor: Actor,
): Promise<Clip> {
  const fields = await resolveClipFields(ctx.knex, body)
  let measured: Measured
  try {
    measured = await measureUpload(file, body.kind)
  } catch (err) {
    if (!(err instanceof RecordingRefused)) throw err
    throw validationFailed(`${err.message} Nothing was stored.`, {
      fields: { file: [err.message] },
    })
  }
  const [clip] = await storeClips(
    clipDeps(ctx),
    [{ fields, originalName: file.name, measured, source: { tempPath: file.path } }],
    actor,
    { action: 'clips.uploaded', details: { recipeId: fields.recipeId, kind: fields.kind } },
  )
  return clip
}

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

interface StoredRow {
  id: number
  recipe_id: number
  excerpt_id: number
  performer_code: string
  instrument_code: string
  bow_stroke: string
  string_played: string
  strings_age_days: number | null
  recorded_on: string | null
  kind: ClipUploadFields['kind']
  notes: string
  original_file: string
  rendition_file: string
  rendition_gain_db: number
  loudness_lufs: number
  peak_dbfs: number
  bit_depth: number
}

const fieldsOfRow = (r: StoredRow): ResolvedFields => ({
  recipeId: r.recipe_id,
  excerptId: r.excerpt_id,
  performerCode: r.performer_code,
  instrumentCode: r.instrument_code,
  bowStroke: r.bow_stroke,
  stringPlayed: r.string_played,
  stringsAgeDays: r.strings_age_days,
  recordedOn: r.recorded_on,
  kind: r.kind,
  notes: r.notes,
})

/**
 * Changes a clip's fields. Moving it to another set re-balances both sets; changing its kind
 * measures the original again, since decay and attack belong to different kinds.
 */
export function updateClip(
  ctx: AppContext,
  id: number,
  body: Partial<ClipUploadFields>,
  actor: Actor,
): Promise<ClipDetail> {
  const deps = clipDeps(ctx)
  return serialised(ctx.knex, async () => {
    const row: StoredRow | undefined = await ctx.knex('clips').where({ id }).first()
    if (!row) throw notFound('Clip')
    const before = fieldsOfRow(row)
    const after = await resolveClipFields(
      ctx.knex,
      { ...before, ...body },
      { allowRetiredExcerptId: row.excerpt_id },
    )
    const changed = (Object.keys(after) as (keyof ResolvedFields)[]).filter(
      (k) => after[k] !== before[k],
    )
    if (changed.length === 0) return getClip(ctx.knex, id)
    // Only what the editor asked to change counts: blank fields are filled in from the recipe.
    await assertClipChangeAllowed(
      ctx.knex,
      id,
      changed.filter((k) => k in body),
    )

    const remeasured =
      after.kind !== before.kind
        ? measureColumns(
            await measureRecording(await readOriginal(deps.folders, row.original_file), after.kind),
          )
        : {}
    const write = async (trx: Knex.Transaction) => {
      await trx('clips')
        .where({ id })
        .update({
          ...fieldColumns(after),
          ...remeasured,
          updated_at: deps.clock.now().toISOString(),
        })
      await recordAudit(trx, deps.clock.now(), actor, {
        action: 'clips.updated',
        targetType: 'clip',
        targetId: id,
        details: { fields: changed },
      })
    }
    const oldKey = keyOf(before)
    const newKey = keyOf(after)
    if (setKeyId(oldKey) === setKeyId(newKey)) await ctx.knex.transaction(write)
    else {
      const moving: SetMember = {
        key: newKey,
        clipId: id,
        loudnessLufs: row.loudness_lufs,
        peakDbfs: row.peak_dbfs,
        bitDepth: row.bit_depth,
        originalFile: row.original_file,
        renditionFile: row.rendition_file,
        gainDb: row.rendition_gain_db,
      }
      await withBalancedSets(deps, [oldKey, newKey], { extra: [moving], excludeIds: [id] }, write)
    }
    return getClip(ctx.knex, id)
  })
}

/**
 * Deletes a clip no session uses, with both its files; the rest of its set is re-balanced.
 * A clip a session uses is archived instead (see archive.ts).
 */
export function deleteClip(ctx: AppContext, id: number, actor: Actor): Promise<{ id: number }> {
  const deps = clipDeps(ctx)
  return serialised(ctx.knex, async () => {
    const row: StoredRow | undefined = await ctx.knex('clips').where({ id }).first()
    if (!row) throw notFound('Clip')
    await assertClipDeletable(ctx.knex, id)
    await withBalancedSets(deps, [keyOf(fieldsOfRow(row))], { excludeIds: [id] }, async (trx) => {
      await trx('clips').where({ id }).delete()
      await recordAudit(trx, deps.clock.now(), actor, {
        action: 'clips.deleted',
        targetType: 'clip',
        targetId: id,
        details: { recipeId: row.recipe_id, excerptId: row.excerpt_id },
      })
    })
    await removeMedia([
      originalPath(deps.folders, row.original_file),
      renditionPath(deps.folders, row.rendition_file),
    ])
    return { id }
  })
}
