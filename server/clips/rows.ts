import { CLIP_MEASURES, type ClipMeasureValues } from '../../shared/measures'
import type { Knex } from 'knex'
import type { Clip, ClipDetail } from '../../shared/schemas/clips'

export interface ClipRow {
  id: number
  recipe_id: number
  recipe_name: string
  recipe_version: number
  instrument: Clip['instrument']
  excerpt_id: number
  excerpt_name: string
  performer_code: string
  instrument_code: string
  bow_stroke: string
  string_played: string
  strings_age_days: number | null
  recorded_on: string | null
  kind: Clip['kind']
  notes: string
  revision: number
  archived_at: string | null
  original_name: string
  rendition_gain_db: number
  /** Measured on the rendition itself; null for one written before that was kept. */
  rendition_loudness_lufs: number | null
  container: Clip['container']
  duration_s: number
  sample_rate: number
  channels: number
  bit_depth: number
  peak_dbfs: number
  loudness_lufs: number
  centroid_hz: number | null
  f0_hz: number | null
  t60_s: number | null
  loss_factor: number | null
  attack_s: number | null
  created_by_name: string | null
  created_at: string
  peaks?: string
}

/** Clips with the names people read; file names on disk never leave the server. */
export function clipQuery(knex: Knex) {
  return knex('clips as c')
    .join('recipes as r', 'r.id', 'c.recipe_id')
    .join('excerpts as e', 'e.id', 'c.excerpt_id')
    .leftJoin('users as u', 'u.id', 'c.created_by')
    .select(
      'c.id',
      'c.recipe_id',
      'r.name as recipe_name',
      'r.version as recipe_version',
      'r.instrument',
      'c.excerpt_id',
      'e.name as excerpt_name',
      'c.performer_code',
      'c.instrument_code',
      'c.bow_stroke',
      'c.string_played',
      'c.strings_age_days',
      'c.recorded_on',
      'c.kind',
      'c.notes',
      'c.revision',
      'c.archived_at',
      'c.original_name',
      'c.rendition_gain_db',
      'c.rendition_loudness_lufs',
      'c.container',
      'c.duration_s',
      'c.sample_rate',
      'c.channels',
      'c.bit_depth',
      'c.peak_dbfs',
      ...CLIP_MEASURES.map((m) => `c.${m.column}`),
      'u.name as created_by_name',
      'c.created_at',
    )
}

/** The listed measures of a row, by API field (loudness is always measured: uploads need it). */
function measureFields(r: ClipRow): ClipMeasureValues & { loudnessLufs: number } {
  const values = Object.fromEntries(CLIP_MEASURES.map((m) => [m.key, r[m.column]]))
  return values as ClipMeasureValues & { loudnessLufs: number }
}

export const toClip = (r: ClipRow): Clip => ({
  id: r.id,
  recipeId: r.recipe_id,
  recipeName: r.recipe_name,
  recipeVersion: r.recipe_version,
  instrument: r.instrument,
  excerptId: r.excerpt_id,
  excerptName: r.excerpt_name,
  performerCode: r.performer_code,
  instrumentCode: r.instrument_code,
  bowStroke: r.bow_stroke,
  stringPlayed: r.string_played,
  stringsAgeDays: r.strings_age_days,
  recordedOn: r.recorded_on,
  kind: r.kind,
  notes: r.notes,
  revision: r.revision,
  archivedAt: r.archived_at,
  originalName: r.original_name,
  renditionGainDb: r.rendition_gain_db,
  renditionLufs: r.rendition_loudness_lufs ?? r.loudness_lufs + r.rendition_gain_db,
  audioUrl: `/api/clips/${r.id}/audio`,
  container: r.container,
  durationS: r.duration_s,
  sampleRate: r.sample_rate,
  channels: r.channels,
  bitDepth: r.bit_depth,
  peakDbfs: r.peak_dbfs,
  ...measureFields(r),
  createdBy: r.created_by_name,
  createdAt: r.created_at,
})

export const toClipDetail = (r: ClipRow): ClipDetail => ({
  ...toClip(r),
  peaks: JSON.parse(r.peaks ?? '{"min":[],"max":[]}') as ClipDetail['peaks'],
})
