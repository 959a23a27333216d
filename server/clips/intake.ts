/*
 * Taking recordings in: an upload is checked and measured, then clips are stored all together
 * with their matched sets re-balanced.
 */
import type { AppContext } from '../context'
import { validationFailed } from '../errors'
import { recordAudit, type Actor } from '../audit/service'
import {
  contentTypeProblem,
  fileNameProblem,
  keepOriginal,
  originalPath,
  removeMedia,
  writeOriginal,
  type UploadedFile,
} from './storage'
import { measureColumns, measureFile, RecordingRefused, type Measured } from './measure'
import { renditionColumns, sourceOfRow, type SetMember } from './setMembers'
import { resolveClipFields, type ResolvedFields } from './fields'
import { clipQuery, toClip, type ClipRow } from './rows'
import { fieldColumns } from './columns'
import { clipDeps, keyOf, serialised, withBalancedSets, type ClipDeps } from './balance'
import type { Clip, ClipUploadFields } from '../../shared/schemas/clips'
import type { WorkerPool } from '../workers/pool'

/** One recording checked and measured, ready to be stored. */
export interface PreparedClip {
  fields: ResolvedFields
  originalName: string
  measured: Measured
  /** Either an upload waiting in the temp folder or bytes made on the server. */
  source: { tempPath: string } | { bytes: Uint8Array }
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
          source: sourceOfRow(measureColumns(p.measured)),
          originalFile: file,
          renditionFile: null,
          gainDb: null,
          rendition: null,
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
              ...renditionColumns(rendition.facts),
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

/** Why an uploaded file cannot even be opened: its name or declared type. */
export function uploadProblem(file: UploadedFile): string | null {
  return fileNameProblem(file.name) ?? contentTypeProblem(file.mimeType)
}

/**
 * Measures an upload; a refusal names the file and the reason. Decoding and measuring a long
 * take costs seconds of work, so it runs in the worker pool when one is given.
 */
export async function measureUpload(
  file: UploadedFile,
  kind: ClipUploadFields['kind'],
  pool?: WorkerPool,
): Promise<Measured> {
  const problem = uploadProblem(file)
  if (problem) throw new RecordingRefused(problem)
  // Measured from its file on disk, read in blocks: the upload is never held whole, nor copied
  // to the thread.
  return measureFile(file.path, kind, pool)
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
    measured = await measureUpload(file, body.kind, ctx.pool)
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
