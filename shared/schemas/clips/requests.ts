import { z } from 'zod'
import { ARCHIVED_FILTERS, LIMITS } from '../../constants'
import { isoDate } from '../common'
import { visibleText } from '../visibleText'
import { namesAChange, revision } from '../revision'
import { CLIP_KINDS, CLIP_LIMITS } from './vocabulary'

// What the clip pages send: one upload, an edit, the list filter and a manifest's rows.

const blankToNull = (v: unknown) =>
  v === '' || v === undefined || (typeof v === 'string' && v.trim() === '') ? null : v

// Codes stand for people and instruments in results, so they are plain and case-blind. The
// visible check comes before the letters rule, so a blank code is told why first.
const code = (what: string) =>
  visibleText(
    z
      .string(`${what} is required`)
      .trim()
      .min(1, 'Required')
      .max(CLIP_LIMITS.codeMax, `At most ${CLIP_LIMITS.codeMax} characters`),
  )
    .regex(/^[A-Za-z0-9][A-Za-z0-9._-]*$/, 'Letters, digits, dot, dash or underscore; no spaces')
    .transform((s) => s.toUpperCase())

const id = (what: string) =>
  z.coerce.number(`Choose ${what}`).int(`Choose ${what}`).positive(`Choose ${what}`)

export const clipFields = {
  recipeId: id('a recipe'),
  excerptId: id('an excerpt'),
  performerCode: code('Performer code'),
  instrumentCode: code('Instrument code'),
  bowStroke: z
    .string()
    .trim()
    .max(CLIP_LIMITS.bowStrokeMax, `At most ${CLIP_LIMITS.bowStrokeMax} characters`),
  stringPlayed: z.string().trim().max(4, 'A string name such as A or D'),
  stringsAgeDays: z.preprocess(
    blankToNull,
    z.coerce
      .number('Whole days')
      .int('Whole days')
      .min(0, 'Not below 0 days')
      .max(CLIP_LIMITS.stringsAgeMaxDays, `At most ${CLIP_LIMITS.stringsAgeMaxDays} days`)
      .nullable(),
  ),
  recordedOn: z.preprocess(blankToNull, isoDate.nullable()),
  kind: z.enum(CLIP_KINDS, 'Kind is bowed or plucked'),
  notes: z.string().trim().max(LIMITS.notesMax, `At most ${LIMITS.notesMax} characters`),
}

/** The fields sent beside one uploaded file (multipart: every value arrives as text). */
export const clipUploadBody = z.strictObject({
  ...clipFields,
  bowStroke: clipFields.bowStroke.default(''),
  stringPlayed: clipFields.stringPlayed.default(''),
  stringsAgeDays: clipFields.stringsAgeDays.default(null),
  recordedOn: clipFields.recordedOn.default(null),
  notes: clipFields.notes.default(''),
})
export type ClipUploadBody = z.input<typeof clipUploadBody>
export type ClipUploadFields = z.output<typeof clipUploadBody>

export const updateClipBody = z
  .strictObject({
    recipeId: clipFields.recipeId.optional(),
    excerptId: clipFields.excerptId.optional(),
    performerCode: clipFields.performerCode.optional(),
    instrumentCode: clipFields.instrumentCode.optional(),
    bowStroke: clipFields.bowStroke.optional(),
    stringPlayed: clipFields.stringPlayed.optional(),
    stringsAgeDays: clipFields.stringsAgeDays.optional(),
    recordedOn: clipFields.recordedOn.optional(),
    kind: clipFields.kind.optional(),
    notes: clipFields.notes.optional(),
    revision,
  })
  .refine(namesAChange, 'Nothing to change')
export type UpdateClipBody = z.input<typeof updateClipBody>

export const listClipsQuery = z.object({
  recipeId: z.coerce.number().int().positive().optional(),
  excerptId: z.coerce.number().int().positive().optional(),
  performerCode: z.string().trim().max(CLIP_LIMITS.codeMax).optional(),
  instrumentCode: z.string().trim().max(CLIP_LIMITS.codeMax).optional(),
  kind: z.enum(CLIP_KINDS).optional(),
  /** Archived clips are hidden unless asked for. */
  archived: z.enum(ARCHIVED_FILTERS).default('hide'),
})
export type ListClipsQuery = z.infer<typeof listClipsQuery>

/** Columns of a manifest: one row per file sent with it. */
export const MANIFEST_COLUMNS = [
  'file',
  'recipe',
  'recipe_version',
  'excerpt',
  'performer_code',
  'instrument_code',
  'bow_stroke',
  'string_played',
  'strings_age_days',
  'recorded_on',
  'kind',
  'notes',
] as const
export const MANIFEST_REQUIRED = [
  'file',
  'recipe',
  'excerpt',
  'performer_code',
  'instrument_code',
  'kind',
] as const

export const manifestRow = z.strictObject({
  file: z.string().trim().min(1, 'Required').max(CLIP_LIMITS.fileNameMax),
  recipe: z.string().trim().min(1, 'Required').max(LIMITS.nameMax),
  recipe_version: z.preprocess(
    blankToNull,
    z.coerce.number('A whole number').int('A whole number').min(1).max(999).nullable(),
  ),
  excerpt: z.string().trim().min(1, 'Required').max(80),
  performer_code: clipFields.performerCode,
  instrument_code: clipFields.instrumentCode,
  bow_stroke: clipFields.bowStroke.default(''),
  string_played: clipFields.stringPlayed.default(''),
  strings_age_days: clipFields.stringsAgeDays.default(null),
  recorded_on: clipFields.recordedOn.default(null),
  kind: z.string().trim().toLowerCase().pipe(clipFields.kind),
  notes: clipFields.notes.default(''),
})
export type ManifestRow = z.output<typeof manifestRow>
