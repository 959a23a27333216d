import { z } from 'zod'
import { INSTRUMENTS, LIMITS, type Instrument } from '../constants'
import { isoDate } from './common'

export const CLIP_KINDS = ['bowed', 'plucked'] as const
export type ClipKind = (typeof CLIP_KINDS)[number]
export const CLIP_KIND_LABELS: Record<ClipKind, string> = {
  bowed: 'Bowed passage',
  plucked: 'Plucked ring-out',
}

/** Offered in the form; any other short wording is accepted too. */
export const BOW_STROKES = [
  'détaché',
  'legato',
  'martelé',
  'spiccato',
  'sautillé',
  'staccato',
  'whole bows',
] as const

export const CLIP_LIMITS = {
  codeMax: 40,
  bowStrokeMax: 40,
  fileNameMax: 255,
  /** Ten years on the instrument is far beyond any string's life. */
  stringsAgeMaxDays: 3650,
  /** Files in one upload with a manifest. */
  batchMaxFiles: 200,
  /** The blind renditions are brought to this loudness (EBU R 128 programme level). */
  targetLufs: -23,
  /** No rendition sample may peak above this. */
  ceilingDbfs: -1,
  /** The extensions the upload form offers; the server trusts the bytes, not the name. */
  extensions: ['.wav', '.wave', '.flac'],
} as const

export const BASE_EXCERPTS = [
  { name: 'open string', description: 'The open string, bowed in whole bows' },
  { name: 'scale', description: 'A one-octave scale starting on the open string' },
  { name: 'phrase', description: 'A short melodic phrase with bow changes' },
  { name: 'pluck ring-out', description: 'The open string plucked once and left to ring' },
] as const

const blankToNull = (v: unknown) =>
  v === '' || v === undefined || (typeof v === 'string' && v.trim() === '') ? null : v

// Codes stand for people and instruments in results, so they are plain and case-blind.
const code = (what: string) =>
  z
    .string(`${what} is required`)
    .trim()
    .min(1, 'Required')
    .max(CLIP_LIMITS.codeMax, `At most ${CLIP_LIMITS.codeMax} characters`)
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
  })
  .refine((b) => Object.keys(b).length > 0, 'Nothing to change')
export type UpdateClipBody = z.input<typeof updateClipBody>

export const listClipsQuery = z.object({
  recipeId: z.coerce.number().int().positive().optional(),
  excerptId: z.coerce.number().int().positive().optional(),
  performerCode: z.string().trim().max(CLIP_LIMITS.codeMax).optional(),
  instrumentCode: z.string().trim().max(CLIP_LIMITS.codeMax).optional(),
  kind: z.enum(CLIP_KINDS).optional(),
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

export const createExcerptBody = z.strictObject({
  name: z.string().trim().min(1, 'Required').max(80, 'At most 80 characters'),
  description: z.string().trim().max(500, 'At most 500 characters').default(''),
})
export type CreateExcerptBody = z.input<typeof createExcerptBody>

export const updateExcerptBody = z
  .strictObject({
    name: createExcerptBody.shape.name.optional(),
    description: z.string().trim().max(500, 'At most 500 characters').optional(),
    active: z.boolean('Active is true or false').optional(),
  })
  .refine((b) => Object.keys(b).length > 0, 'Nothing to change')
export type UpdateExcerptBody = z.infer<typeof updateExcerptBody>

export interface Excerpt {
  id: number
  name: string
  description: string
  active: boolean
  clipCount: number
}

export interface ClipMeasures {
  container: 'wav' | 'rf64' | 'flac'
  durationS: number
  sampleRate: number
  channels: number
  bitDepth: number
  peakDbfs: number
  loudnessLufs: number
  centroidHz: number | null
  f0Hz: number | null
  /** Plucked ring-outs: decay time of the fundamental and its loss factor. */
  t60S: number | null
  lossFactor: number | null
  /** Bowed passages: onset to steady level of the first note. */
  attackS: number | null
}

export interface Clip extends ClipMeasures {
  id: number
  recipeId: number
  recipeName: string
  recipeVersion: number
  instrument: Instrument
  excerptId: number
  excerptName: string
  performerCode: string
  instrumentCode: string
  bowStroke: string
  stringPlayed: string
  stringsAgeDays: number | null
  recordedOn: string | null
  kind: ClipKind
  notes: string
  originalName: string
  /** The gain the blind rendition carries, and the loudness it reaches. */
  renditionGainDb: number
  renditionLufs: number
  audioUrl: string
  createdBy: string | null
  createdAt: string
}

export interface ClipDetail extends Clip {
  peaks: { min: number[]; max: number[] }
}

export interface MatchedSet {
  excerptId: number
  excerptName: string
  performerCode: string
  instrumentCode: string
  /** Recipe id → clip ids of this set recorded on that recipe. */
  cells: Record<number, number[]>
  complete: boolean
  /** The loudness every rendition of the set is brought to. */
  targetLufs: number
}

/** Sets whose recipes are strings for the same instrument and string, side by side. */
export interface MatchedSetSection {
  instrument: (typeof INSTRUMENTS)[number]
  stringName: string
  recipes: { id: number; name: string; version: number }[]
  sets: MatchedSet[]
}

export interface ManifestResult {
  clips: Clip[]
}
