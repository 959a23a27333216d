import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { readCsvTable } from '../lib/csvTable'
import { validationFailed } from '../errors'
import type { Actor } from '../audit/service'
import type { UploadedFile } from './storage'
import { RecordingRefused } from './measure'
import { checkClipFields } from './fields'
import { clipDeps } from './balance'
import { measureUpload, storeClips, type PreparedClip } from './intake'
import { zodMessages } from '../../shared/schemas/fieldErrors'
import {
  CLIP_LIMITS,
  MANIFEST_COLUMNS,
  MANIFEST_REQUIRED,
  manifestRow,
  type Clip,
  type ManifestRow,
} from '../../shared/schemas/clips'
import type { CsvRowError } from '../../shared/schemas/panel'

// Field names of the form, as the manifest's columns call them.
const COLUMN_OF: Record<string, string> = {
  recipeId: 'recipe',
  excerptId: 'excerpt',
  stringPlayed: 'string_played',
}

function readManifest(text: string): Record<string, string>[] {
  return readCsvTable(text, {
    what: 'manifest',
    rowName: 'file',
    columns: MANIFEST_COLUMNS,
    required: MANIFEST_REQUIRED,
    maxRows: CLIP_LIMITS.batchMaxFiles,
  })
}

async function recipeIdOf(db: Knex, row: ManifestRow): Promise<number | string> {
  const q = db('recipes').whereRaw('lower(name) = lower(?)', [row.recipe])
  if (row.recipe_version !== null) q.where({ version: row.recipe_version })
  const found: { id: number; version: number }[] = await q.select('id', 'version')
  if (found.length === 1) return found[0].id
  if (found.length === 0)
    return row.recipe_version === null
      ? 'recipe: no recipe of this name'
      : `recipe: no version ${row.recipe_version} of this recipe`
  return `recipe: ${found.length} versions of this recipe exist; name one in recipe_version`
}

async function excerptIdOf(db: Knex, name: string): Promise<number | string> {
  const found: { id: number } | undefined = await db('excerpts')
    .whereRaw('lower(name) = lower(?)', [name])
    .first('id')
  return found?.id ?? 'excerpt: no excerpt of this name (add it under Excerpts first)'
}

/**
 * Stores the files of a manifest all or nothing. Every row is checked first: its fields, its
 * recipe and excerpt, that its file was sent, and that the file is a recording we can measure.
 * One problem anywhere means nothing is stored, and the answer lists every row to fix.
 * Row numbers are the file's line numbers, header = line 1, as a spreadsheet shows them.
 */
export async function importClipManifest(
  ctx: AppContext,
  manifestText: string,
  files: UploadedFile[],
  actor: Actor,
): Promise<{ clips: Clip[] }> {
  const records = readManifest(manifestText)
  const sent = new Map<string, UploadedFile[]>()
  for (const f of files) sent.set(f.name, [...(sent.get(f.name) ?? []), f])

  const rows: CsvRowError[] = []
  const prepared: PreparedClip[] = []
  const named = new Map<string, number>()
  for (const [i, record] of records.entries()) {
    const line = i + 2
    const errors: string[] = []
    const parsed = manifestRow.safeParse(record)
    if (!parsed.success) {
      rows.push({ row: line, errors: zodMessages(parsed.error) })
      continue
    }
    const row = parsed.data
    const first = named.get(row.file)
    if (first) errors.push(`file: the same file is on line ${first}`)
    else named.set(row.file, line)
    const matches = sent.get(row.file) ?? []
    if (matches.length === 0) errors.push(`file: ${row.file} was not among the files sent`)
    if (matches.length > 1) errors.push(`file: ${matches.length} files named ${row.file} were sent`)

    const recipeId = await recipeIdOf(ctx.knex, row)
    const excerptId = await excerptIdOf(ctx.knex, row.excerpt)
    if (typeof recipeId === 'string') errors.push(recipeId)
    if (typeof excerptId === 'string') errors.push(excerptId)
    if (typeof recipeId === 'number' && typeof excerptId === 'number') {
      const { fields, problems } = await checkClipFields(ctx.knex, {
        recipeId,
        excerptId,
        performerCode: row.performer_code,
        instrumentCode: row.instrument_code,
        bowStroke: row.bow_stroke,
        stringPlayed: row.string_played,
        stringsAgeDays: row.strings_age_days,
        recordedOn: row.recorded_on,
        kind: row.kind,
        notes: row.notes,
      })
      for (const [field, msgs] of Object.entries(problems))
        for (const m of msgs) errors.push(`${COLUMN_OF[field] ?? field}: ${m}`)
      // The file is opened only for rows that are otherwise right: a long manifest with a wrong
      // column should not cost the measuring of every recording first.
      if (fields && errors.length === 0) {
        try {
          const measured = await measureUpload(matches[0], row.kind, ctx.pool)
          prepared.push({
            fields,
            originalName: row.file,
            measured,
            source: { tempPath: matches[0].path },
          })
        } catch (err) {
          if (!(err instanceof RecordingRefused)) throw err
          errors.push(`file: ${err.message}`)
        }
      }
    }
    if (errors.length) rows.push({ row: line, errors })
  }

  const unnamed = [...sent.keys()].filter((name) => !named.has(name))
  if (rows.length || unnamed.length) {
    const parts = []
    if (rows.length) parts.push(`${rows.length} of ${records.length} rows have problems`)
    if (unnamed.length) parts.push(`the manifest does not name ${unnamed.join(', ')}`)
    throw validationFailed(`${parts.join('; ')}; nothing was stored`, { rows })
  }
  const clips = await storeClips(clipDeps(ctx), prepared, actor, { action: 'clips.imported' })
  return { clips }
}
