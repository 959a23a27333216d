/*
 * A clip's resolved fields to and from the columns of the clips table, for the writes that
 * store, edit and delete clips.
 */
import type { ResolvedFields } from './fields'
import type { ClipUploadFields } from '../../shared/schemas/clips'
import type { MemberRow } from './setMembers'

export function fieldColumns(f: ResolvedFields) {
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

/** The columns of a stored clip that edits and deletes read. */
export interface StoredRow extends MemberRow {
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

export const fieldsOfRow = (r: StoredRow): ResolvedFields => ({
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
